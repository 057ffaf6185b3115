import type { Knex } from 'knex';
import { DEFAULT_RECIPES, ratesFor } from '../../lib/takeoff/defaults.ts';
import { addRateVersions } from '../repos/rates.ts';

/**
 * What a new company starts with: the fence styles most shops build, each with a starting
 * recipe (stored as JSON) and labour rates; companies edit both to their own practice.
 */
const STYLES: { name: string; kind: string; description: string }[] = [
  { name: 'Wood privacy 6 ft', kind: 'wood_privacy', description: 'Dog-ear pickets, board to board, on 4×4 posts with three 2×4 rails.' },
  { name: 'Split rail 3-rail', kind: 'split_rail', description: 'Mortised posts with three split rails per bay.' },
  { name: 'Welded-wire panel in timber frame', kind: 'wire_panel', description: 'Welded-wire panels framed by treated rails and a cap board on 4×4 posts.' },
  { name: 'Chain link 4 ft', kind: 'chain_link', description: 'Galvanized 11½ gauge fabric on steel line and terminal posts.' },
  { name: 'Vinyl privacy 6 ft', kind: 'vinyl', description: 'Routed vinyl posts with tongue-and-groove panels.' },
  { name: 'Ornamental steel 4 ft', kind: 'ornamental', description: 'Powder-coated steel panels on 2 in square posts.' },
];

export const DEFAULT_STYLES: { name: string; kind: string; description: string; recipe: string }[] = STYLES.map((s) => ({
  ...s,
  recipe: JSON.stringify(DEFAULT_RECIPES[s.kind]),
}));

/** Version 1 of every labour rate of each style that has none yet. */
export async function seedDefaultRates(trx: Knex.Transaction, companyId: string, userId: string | null, at?: Date): Promise<void> {
  const styles = await trx('fence_styles').where('organization_id', companyId).select('id', 'kind');
  for (const s of styles) await addRateVersions(companyId, Number(s.id), ratesFor(s.kind), 'Starting rates (common practice, for calibration to correct)', userId, trx, at);
}

export async function seedCompanyDefaults(q: Knex | Knex.Transaction, companyId: string): Promise<void> {
  const existing = await q('fence_styles').where('organization_id', companyId).first('id');
  if (existing) return;
  await q('fence_styles').insert(DEFAULT_STYLES.map((s) => ({ organization_id: companyId, ...s })));
  const run = (trx: Knex.Transaction) => seedDefaultRates(trx, companyId, null);
  if ('commit' in q) await run(q as Knex.Transaction);
  else await (q as Knex).transaction(run);
}
