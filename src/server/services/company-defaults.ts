import type { Knex } from 'knex';

/**
 * What a new company starts with: the fence styles most shops build. The bids feature
 * fills in each style's recipe; companies edit them to their own practice.
 */
export const DEFAULT_STYLES: { name: string; kind: string; description: string }[] = [
  { name: 'Wood privacy 6 ft', kind: 'wood_privacy', description: 'Dog-ear pickets, board to board, on 4×4 posts with three 2×4 rails.' },
  { name: 'Split rail 3-rail', kind: 'split_rail', description: 'Mortised posts with three split rails per bay.' },
  { name: 'Welded-wire panel in timber frame', kind: 'wire_panel', description: 'Welded-wire panels framed by treated rails and a cap board on 4×4 posts.' },
  { name: 'Chain link 4 ft', kind: 'chain_link', description: 'Galvanized 11½ gauge fabric on steel line and terminal posts.' },
  { name: 'Vinyl privacy 6 ft', kind: 'vinyl', description: 'Routed vinyl posts with tongue-and-groove panels.' },
  { name: 'Ornamental steel 4 ft', kind: 'ornamental', description: 'Powder-coated steel panels on 2 in square posts.' },
];

export async function seedCompanyDefaults(q: Knex | Knex.Transaction, companyId: string): Promise<void> {
  const existing = await q('fence_styles').where('organization_id', companyId).first('id');
  if (existing) return;
  await q('fence_styles').insert(DEFAULT_STYLES.map((s) => ({ organization_id: companyId, ...s })));
}
