import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { pathToFileURL } from 'node:url';

const fonts = `${pathToFileURL(path.join(path.dirname(createRequire(import.meta.url).resolve('pdfjs-dist/package.json')), 'standard_fonts')).href}/`;

export interface PdfText {
  pages: number;
  /** the text of each printed line, top to bottom, separate pieces on one line joined by a space */
  lines: string[];
  /** the addresses of the link annotations */
  links: string[];
}

/** Reads the text a PDF viewer would show, with Mozilla's PDF.js (pdfjs-dist). */
export async function pdfText(bytes: Uint8Array): Promise<PdfText> {
  const doc = await getDocument({ data: new Uint8Array(bytes), standardFontDataUrl: fonts, isEvalSupported: false }).promise;
  const lines: string[] = [];
  const links: string[] = [];
  for (let n = 1; n <= doc.numPages; n++) {
    const page = await doc.getPage(n);
    const content = await page.getTextContent();
    const rows = new Map<number, { x: number; w: number; s: string }[]>();
    for (const item of content.items) {
      if (!('str' in item) || !item.str.trim()) continue;
      const y = Math.round(item.transform[5]);
      const row = rows.get(y) ?? [];
      row.push({ x: item.transform[4], w: item.width, s: item.str });
      rows.set(y, row);
    }
    // PDF.js may cut one run of text in two (at a kerning step, say): pieces that touch are
    // joined as they are, pieces with a gap between them by a space.
    for (const y of [...rows.keys()].sort((a, b) => b - a)) {
      let text = '';
      let end = -Infinity;
      for (const r of rows.get(y)!.sort((a, b) => a.x - b.x)) {
        text += (text && r.x - end > 1.5 ? ' ' : '') + r.s;
        end = r.x + r.w;
      }
      lines.push(text.replace(/\s+/g, ' ').trim());
    }
    for (const a of await page.getAnnotations()) if (a.url) links.push(a.url as string);
  }
  await doc.destroy();
  return { pages: doc.numPages, lines, links };
}
