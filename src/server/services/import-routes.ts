import type { APIRoute } from 'astro';
import { idParam, route } from '../http.ts';
import type { Action } from '../../lib/auth/permissions.ts';
import type { ImportKind } from '../../lib/csv/mapping.ts';
import { commitInput, fixRowInput, importLinesQuery, remapInput } from '../../lib/csv/imports.ts';
import { commitImport, discardImport, downloadImport, fixImportLine, getImport, listImportLines, listImports, remapImport, uploadImport } from './imports.ts';

/**
 * The import endpoints, declared once for both kinds of file: receipts under
 * /api/receipts/imports and timesheets under /api/time/imports, each with its own permissions.
 */
export function importRoutes(kind: ImportKind, read: Action, write: Action) {
  const id = (p: Record<string, string | undefined>) => idParam(p.id, 'That import');
  return {
    collection: {
      GET: route({ access: read, handle: ({ actor }) => listImports(actor, kind) }),
      POST: route({ access: write, status: 201, handle: ({ actor, ctx }) => uploadImport(actor, ctx.request, kind) }),
    },
    item: {
      GET: route({ access: read, handle: ({ actor, params }) => getImport(actor, id(params), kind) }),
      PUT: route({ access: write, body: remapInput, handle: ({ actor, params, body }) => remapImport(actor, id(params), body, kind) }),
      DELETE: route({ access: write, handle: ({ actor, params }) => discardImport(actor, id(params), kind) }),
    },
    commit: {
      POST: route({ access: write, body: commitInput, handle: ({ actor, params, body }) => commitImport(actor, id(params), body, kind) }),
    },
    lines: {
      GET: route({ access: read, query: importLinesQuery, handle: ({ actor, params, query }) => listImportLines(actor, id(params), query, kind) }),
    },
    line: {
      PATCH: route({ access: write, body: fixRowInput, handle: ({ actor, params, body }) => fixImportLine(actor, id(params), idParam(params.lineId, 'That row'), body.cells, kind) }),
    },
    file: {
      GET: route({ access: read, handle: ({ actor, params }) => downloadImport(actor, id(params), kind) }),
    },
  } satisfies Record<string, Record<string, APIRoute>>;
}

export const receiptImports = importRoutes('receipts', 'receipts:read', 'receipts:write');
export const timesheetImports = importRoutes('timesheet', 'time:read_all', 'time:read_all');
