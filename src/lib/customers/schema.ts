import { z } from 'zod';

const text = (max: number) => z.string().trim().max(max, `At most ${max} characters.`);
// Optional fields take a string, null or nothing and give a string or null: parsing twice is harmless.
const optionalText = (max: number) => text(max).nullish().transform((v) => (v ? v : null));

/** A customer as a form and the API take it; the same schema runs in the browser. */
export const customerInput = z.strictObject({
  name: text(200).min(1, 'Enter the customer\'s name.'),
  email: z
    .string()
    .trim()
    .max(255)
    .nullish()
    .transform((v) => (v ? v.toLowerCase() : null))
    .refine((v) => v === null || z.email().safeParse(v).success, 'Enter a valid e-mail address, or leave it empty.'),
  phone: optionalText(40).refine((v) => v === null || /^[0-9+().\-\s x]{7,40}$/.test(v), 'Enter a phone number such as 555-0142.'),
  billingLine1: optionalText(200),
  billingLine2: optionalText(200),
  billingCity: optionalText(120),
  billingRegion: optionalText(60),
  billingPostal: optionalText(20),
  siteLine1: optionalText(200),
  siteCity: optionalText(120),
  siteRegion: optionalText(60),
  sitePostal: optionalText(20),
  notes: optionalText(4000),
});
export type CustomerInput = z.output<typeof customerInput>;

export interface Customer {
  id: number;
  name: string;
  email: string | null;
  phone: string | null;
  billingLine1: string | null;
  billingLine2: string | null;
  billingCity: string | null;
  billingRegion: string | null;
  billingPostal: string | null;
  siteLine1: string | null;
  siteCity: string | null;
  siteRegion: string | null;
  sitePostal: string | null;
  notes: string | null;
  jobCount?: number;
  createdAt: string;
}

export const customerListQuery = z.strictObject({
  q: z.string().trim().max(100).optional(),
  page: z.coerce.number().int().min(1).max(100000).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});
