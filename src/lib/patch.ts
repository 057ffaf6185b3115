import { z } from 'zod';

/**
 * The body of a PATCH from the schema of a create: every field optional, and a field left
 * out stays out. zod's own partial() keeps each field's default, so a patch that only renames
 * a job would also set its status back to 'lead' (and a worker's wage change would make them
 * active again); here the defaults are taken off first.
 */
export function patchOf<T extends z.ZodRawShape>(schema: z.ZodObject<T>) {
  const shape = Object.fromEntries(
    Object.entries(schema.shape).map(([key, field]) => [key, (field instanceof z.ZodDefault ? (field.unwrap() as z.ZodType) : (field as z.ZodType)).optional()]),
  );
  return z.strictObject(shape) as unknown as ReturnType<z.ZodObject<T>['partial']>;
}
