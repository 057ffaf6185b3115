import type { z } from 'zod';
import { fieldErrors, type FieldErrors } from '../../../lib/errors';

/** Checks a form's values with the endpoint's own zod schema before sending them. */
export function validate<S extends z.ZodType>(schema: S, values: unknown): { ok: true; data: z.output<S> } | { ok: false; fields: FieldErrors } {
  const parsed = schema.safeParse(values);
  if (parsed.success) return { ok: true, data: parsed.data };
  return { ok: false, fields: fieldErrors(parsed.error.issues) };
}
