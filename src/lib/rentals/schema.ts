import { z } from 'zod';
import { EQUIPMENT_KINDS, type EquipmentKind, type RentalPlan } from './rates.ts';
import { idField, idList, nonNegative, optionalCents, optionalDate, optionalId, optionalText, page, pageSize } from '../costs/fields.ts';

const dateTime = z
  .string()
  .trim()
  .transform((v) => v.replace(' ', 'T').slice(0, 16))
  .refine((v) => /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}$/.test(v) && !Number.isNaN(Date.parse(`${v}:00Z`)), 'Use a date and time such as 2026-05-14T07:30.');

const rate = (label: string) => nonNegative(optionalCents(label), label);

export const rentalInput = z
  .strictObject({
    jobId: idField('Choose the job.'),
    kind: z.enum(EQUIPMENT_KINDS, { message: 'Choose the equipment.' }),
    description: optionalText(200),
    supplierId: optionalId('Choose a supplier from the list.'),
    startAt: dateTime,
    endAt: dateTime,
    /** Rates, delivery and fuel: left empty, the company's rate card prices the rental. */
    halfDayCents: rate('half-day rate'),
    dayCents: rate('day rate'),
    weekCents: rate('week rate'),
    deliveryCents: rate('delivery'),
    fuelCents: rate('fuel'),
    notes: optionalText(500),
  })
  .refine((v) => v.endAt > v.startAt, { path: ['endAt'], message: 'The return must be after the pick-up.' });
export type RentalInput = z.output<typeof rentalInput>;

export const rentalListQuery = z.strictObject({
  job: idList,
  from: optionalDate,
  to: optionalDate,
  page,
  pageSize: pageSize(500, 50),
});
export type RentalListQuery = z.output<typeof rentalListQuery>;

export const rateCardInput = z.strictObject({
  rates: z.array(
    z.strictObject({
      kind: z.enum(EQUIPMENT_KINDS),
      halfDayCents: rate('half-day rate'),
      dayCents: rate('day rate'),
      weekCents: rate('week rate'),
    }),
  ).max(EQUIPMENT_KINDS.length),
});
export type RateCardInput = z.output<typeof rateCardInput>;

export interface RateCardRow {
  kind: EquipmentKind;
  halfDayCents: number | null;
  dayCents: number | null;
  weekCents: number | null;
}

export interface Rental {
  id: number;
  jobId: number;
  jobCode: string;
  kind: EquipmentKind;
  description: string | null;
  supplierId: number | null;
  supplierName: string | null;
  startAt: string;
  endAt: string;
  /** hours between pick-up and return */
  hours: number;
  notes: string | null;
  /** The rest is absent for a crew lead. */
  halfDayCents?: number | null;
  dayCents?: number | null;
  weekCents?: number | null;
  deliveryCents?: number;
  fuelCents?: number;
  plan?: RentalPlan | null;
  costCents?: number | null;
}
