import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { patchOf } from '../../src/lib/patch';
import { jobPatch } from '../../src/lib/jobs/schema';

describe('patchOf', () => {
  const create = z.strictObject({ name: z.string().min(1), active: z.boolean().default(true), kind: z.enum(['a', 'b']).default('a') });

  it('leaves out what was not sent, where partial() would fill in the defaults', () => {
    expect(create.partial().parse({ name: 'x' })).toEqual({ name: 'x', active: true, kind: 'a' });
    expect(patchOf(create).parse({ name: 'x' })).toEqual({ name: 'x' });
    expect(patchOf(create).parse({})).toEqual({});
    expect(jobPatch.parse({ title: 'Renamed' })).toEqual({ title: 'Renamed' });
  });

  it('still checks what was sent, and refuses unknown fields', () => {
    expect(patchOf(create).safeParse({ active: 'yes' }).success).toBe(false);
    expect(patchOf(create).safeParse({ name: '' }).success).toBe(false);
    expect(patchOf(create).safeParse({ other: 1 }).success).toBe(false);
    expect(patchOf(create).parse({ active: false, kind: 'b' })).toEqual({ active: false, kind: 'b' });
  });
});
