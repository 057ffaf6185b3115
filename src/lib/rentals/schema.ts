import { z } from 'zod';
import { EQUIPMENT_KINDS, MAX_RENTAL_DAYS, MAX_RENTAL_HOURS, RENTAL_YEARS, rentalHours, wallClockMs, type EquipmentKind, type RentalPlan } from './rates.ts';
import { idField, idList, nonNegative, optionalCents, optionalDate, optionalId, optionalText, page, pageSize } from '../costs/fields.ts';

const WALL_CLOCK = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}$/;
const LIKE = 'Use a date and time such as 2026-05-14T07:30.';

/** A real calendar date and time of day, as the crew's phone sends it; the years bound every rental's length and cost. */
const dateTime = z
  .string({ message: LIKE })
  .max(40, LIKE)
  .trim()
  .transform((v) => v.replace(' ', 'T').slice(0, 16))
  .refine((v) => WALL_CLOCK.test(v), LIKE)
  .refine((v) => !WALL_CLOCK.test(v) || Number.isFinite(wallClockMs(v)), `Use a real date and time between the years ${RENTAL_YEARS.min} and ${RENTAL_YEARS.max}, such as 2026-05-14T07:30.`);

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
  .refine((v) => v.endAt > v.startAt, { path: ['endAt'], message: 'The return must be after the pick-up.' })
  .refine((v) => (rentalHours(v.startAt, v.endAt) ?? 0) <= MAX_RENTAL_HOURS, {
    path: ['endAt'],
    message: `A rental is at most ${MAX_RENTAL_DAYS} days from pick-up to return; enter a longer one as separate rentals.`,
  });
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
