/** Payment terms in plain words; custom takes its own number of days. */
export const TERMS = ['due_on_receipt', 'net_15', 'net_30', 'custom'] as const;
export type Terms = (typeof TERMS)[number];

export const TERMS_LABELS: Record<Terms, string> = {
  due_on_receipt: 'Due on receipt',
  net_15: 'Net 15 days',
  net_30: 'Net 30 days',
  custom: 'Custom',
};

export function termsDays(terms: Terms, customDays: number | null | undefined): number {
  if (terms === 'due_on_receipt') return 0;
  if (terms === 'net_15') return 15;
  if (terms === 'net_30') return 30;
  return customDays ?? 0;
}

/** The terms a company's default number of days reads as. */
export function termsFromDays(days: number): { terms: Terms; days: number } {
  if (days === 0) return { terms: 'due_on_receipt', days };
  if (days === 15) return { terms: 'net_15', days };
  if (days === 30) return { terms: 'net_30', days };
  return { terms: 'custom', days };
}

/** 'YYYY-MM-DD' + n days, in calendar days (UTC arithmetic on a date with no time). */
export function addDays(iso: string, n: number): string {
  const d = new Date(`${iso}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + n);
  return d.toISOString().slice(0, 10);
}

/** Whole calendar days from a to b (b − a). */
export function daysBetween(a: string, b: string): number {
  return Math.round((Date.parse(`${b}T00:00:00Z`) - Date.parse(`${a}T00:00:00Z`)) / 86_400_000);
}

export function dueDate(issuedOn: string, days: number): string {
  return addDays(issuedOn, days);
}
