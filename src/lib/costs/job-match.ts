/**
 * Finding the job a receipt line belongs to from what the counter clerk typed: a job code
 * (J-0142), a PO number (PO 142, PO#142) or "job 142" in the job column, the memo or any
 * other mapped text.
 */
export interface JobRef {
  /** A full code such as J-0142, upper-cased. */
  code?: string;
  /** A bare number from "PO 142" or "Job #142": matches the job whose code carries it. */
  number?: number;
}

const CODE = /\b([A-Z]{1,4})-?(\d{1,6})\b/gi;
const NUMBERED = /\b(?:P\.?\s?O\.?|job|purchase\s+order)\s*(?:#|no\.?|number)?\s*[-:]?\s*(\d{1,6})\b/gi;
const BARE = /^\s*#?\s*(\d{1,6})\s*$/;

export function extractJobRefs(text: string | null | undefined): JobRef[] {
  if (!text) return [];
  const refs: JobRef[] = [];
  for (const m of text.matchAll(NUMBERED)) refs.push({ number: Number(m[1]) });
  const masked = text.replace(NUMBERED, ' ');
  for (const m of masked.matchAll(CODE)) {
    // Only a letter prefix followed by a dash, or J/JOB-style prefixes without one.
    if (!m[0].includes('-') && !/^J/i.test(m[1])) continue;
    refs.push({ code: `${m[1].toUpperCase()}-${m[2]}`, number: Number(m[2]) });
  }
  return refs;
}

export interface JobKey {
  id: number;
  code: string;
}

export type JobMatch = { jobId: number; reason: string } | { jobId: null; reason: string };

function codeParts(code: string): { prefix: string; number: number } | null {
  const m = /^([A-Z]{1,4})-(\d{1,6})$/i.exec(code.trim());
  return m ? { prefix: m[1].toUpperCase(), number: Number(m[2]) } : null;
}

/**
 * The company's job codes indexed once, by full code and by number, so matching 100,000
 * receipt lines against thousands of jobs costs a map lookup per reference.
 */
export class JobIndex {
  readonly byCode = new Map<string, JobKey>();
  readonly byNumber = new Map<number, JobKey[]>();

  constructor(jobs: JobKey[]) {
    for (const j of jobs) {
      const p = codeParts(j.code);
      if (!p) continue;
      this.byCode.set(`${p.prefix}-${p.number}`, j);
      const same = this.byNumber.get(p.number);
      if (same) same.push(j);
      else this.byNumber.set(p.number, [j]);
    }
  }
}

/**
 * Matches the texts in order of trust (the job column first, then memo, then the rest):
 * the first text that names exactly one job decides. A text naming two jobs leaves the
 * line unmatched for the bookkeeper, with the reason.
 */
export function matchJob(texts: { field: string; text: string | null }[], jobs: JobKey[] | JobIndex): JobMatch {
  const { byCode, byNumber } = jobs instanceof JobIndex ? jobs : new JobIndex(jobs);
  let mentioned = false;
  for (const { field, text } of texts) {
    const refs = [...extractJobRefs(text)];
    const bare = field === 'jobRef' && text ? BARE.exec(text) : null;
    if (bare) refs.push({ number: Number(bare[1]) });
    if (!refs.length) continue;
    mentioned = true;
    const found = new Map<number, JobKey>();
    for (const r of refs) {
      if (r.code) {
        const p = codeParts(r.code)!;
        const hit = byCode.get(`${p.prefix}-${p.number}`);
        if (hit) { found.set(hit.id, hit); continue; }
      }
      if (r.number !== undefined && !r.code) {
        const hits = byNumber.get(r.number) ?? [];
        if (hits.length === 1) found.set(hits[0].id, hits[0]);
      }
    }
    if (found.size === 1) {
      const [job] = found.values();
      return { jobId: job.id, reason: `${job.code} from the ${field === 'jobRef' ? 'job column' : field}` };
    }
    if (found.size > 1) return { jobId: null, reason: `the ${field === 'jobRef' ? 'job column' : field} names ${[...found.values()].map((j) => j.code).join(' and ')}` };
  }
  return { jobId: null, reason: mentioned ? 'no job with that code or PO number' : 'no job code or PO number on the line' };
}
