/**
 * Cost categories: a bid's estimate, a job's actual costs and the margin reports all use
 * these, so estimated and actual line up category by category.
 */
export const COST_CATEGORIES = ['material', 'labour', 'rental', 'subcontract', 'permit', 'disposal', 'other'] as const;
export type CostCategory = (typeof COST_CATEGORIES)[number];

export const COST_CATEGORY_LABELS: Record<CostCategory, string> = {
  material: 'Materials',
  labour: 'Labour',
  rental: 'Equipment rental',
  subcontract: 'Subcontract',
  permit: 'Permits and fees',
  disposal: 'Disposal',
  other: 'Other',
};

export function isCostCategory(v: unknown): v is CostCategory {
  return typeof v === 'string' && (COST_CATEGORIES as readonly string[]).includes(v);
}
