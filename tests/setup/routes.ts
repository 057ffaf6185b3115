import { readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { stack } from './stack.ts';

export const METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;
export type Method = (typeof METHODS)[number];

export interface ApiRoute {
  /** e.g. /api/jobs/[id] */
  pattern: string;
  file: string;
  methods: { method: Method; access: string | null; strictBody: boolean }[];
}

function walk(dir: string, out: string[]): void {
  for (const name of readdirSync(dir)) {
    const p = path.join(dir, name);
    if (statSync(p).isDirectory()) walk(p, out);
    else if (/\.(ts|js)$/.test(name)) out.push(p);
  }
}

/** Every endpoint under src/pages/api with each exported method and its declared access. */
export async function apiRoutes(): Promise<ApiRoute[]> {
  const base = path.join(stack().root, 'src/pages/api');
  const files: string[] = [];
  walk(base, files);
  const routes: ApiRoute[] = [];
  for (const file of files.sort()) {
    const rel = path.relative(base, file).replace(/\\/g, '/').replace(/\.(ts|js)$/, '').replace(/\/index$/, '').replace(/^index$/, '');
    const pattern = `/api/${rel}`.replace(/\/$/, '');
    const mod = (await import(file)) as Record<string, unknown>;
    const methods: ApiRoute['methods'] = [];
    for (const m of [...METHODS, 'ALL'] as const) {
      const h = mod[m] as ((...a: unknown[]) => unknown) & { access?: string; strictBody?: boolean } | undefined;
      if (typeof h === 'function') {
        const entry = { access: h.access ?? null, strictBody: Boolean(h.strictBody) };
        if (m === 'ALL') for (const mm of METHODS) methods.push({ method: mm, ...entry });
        else methods.push({ method: m, ...entry });
      }
    }
    routes.push({ pattern, file, methods });
  }
  return routes;
}
