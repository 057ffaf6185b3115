import type { Knex } from 'knex';
import { hashPassword } from 'better-auth/crypto';
import { rng } from '../../lib/random.ts';
import { formatJobCode, type JobStatus } from '../../lib/jobs/schema.ts';
import { DEFAULT_STYLES } from '../services/company-defaults.ts';
import type { Role } from '../../lib/auth/permissions.ts';

/**
 * The invented demo company. Everything here is made up: the company, the town of
 * Wrenfield, its streets, people and numbers. Ids are fixed so later seeds can refer to them.
 */
export const DEMO = {
  orgId: 'org_demo_thornbury_000000000001',
  slug: 'thornbury-fence-demo',
  name: 'Thornbury Fence & Gate',
  town: 'Wrenfield',
  region: 'MN',
  seed: 20260412,
};

export const DEMO_USERS: { id: string; email: string; name: string; role: Role }[] = [
  { id: 'usr_demo_owner_000000000000001', email: 'owner@example.com', name: 'Ruth Abernathy', role: 'owner' },
  { id: 'usr_demo_books_000000000000002', email: 'bookkeeper@example.com', name: 'Lena Osei', role: 'bookkeeper' },
  { id: 'usr_demo_estim_000000000000003', email: 'estimator@example.com', name: 'Cal Brandt', role: 'estimator' },
  { id: 'usr_demo_crewl_000000000000004', email: 'crew@example.com', name: 'Jonah Pike', role: 'crew_lead' },
];

const FIRST = ['Avery', 'Bram', 'Celia', 'Dmitri', 'Elsie', 'Farrah', 'Gus', 'Hollis', 'Imogen', 'Jasper', 'Keiko', 'Lorne', 'Maren', 'Nico', 'Odette', 'Pruitt', 'Quill', 'Rosalind', 'Soren', 'Tamsin', 'Ulla', 'Vaughn', 'Wilda', 'Yusuf'];
const LAST = ['Ashgrove', 'Birchall', 'Coldwater', 'Dunmore', 'Elkhorn', 'Fairbank', 'Greaves', 'Hartwell', 'Ironside', 'Juniper', 'Kettering', 'Larchmont', 'Millward', 'Northcote', 'Oakhurst', 'Pennock', 'Quarrie', 'Redfern', 'Stillwell', 'Thackery'];
const STREETS = ['Sawmill Rd', 'Heron Ln', 'Quarry St', 'Tamarack Ave', 'Bluestem Dr', 'Millpond Ct', 'Orchard Way', 'Flint Hill Rd', 'Cottonwood St', 'Larkspur Ln'];
const BUSINESSES = ['Wrenfield Community Garden', 'Fenwick Storage Yard', 'Old Mill Apartments', 'Lakeside Kennel Club', 'Pinecrest Church', 'Hollow Creek Farm'];
const TITLES: Record<string, string[]> = {
  wood_privacy: ['Back yard privacy fence', 'Privacy fence along the alley', 'Side yard privacy with walk gate'],
  split_rail: ['Split rail along the drive', 'Pasture split rail', 'Front yard split rail'],
  wire_panel: ['Garden enclosure, wire panels in cedar frames', 'Dog run with wire panels', 'Vegetable garden fence'],
  chain_link: ['Chain link around the yard', 'Storage yard chain link', 'Kennel chain link'],
  vinyl: ['Vinyl privacy around the pool', 'White vinyl privacy', 'Vinyl fence with double drive gate'],
  ornamental: ['Ornamental steel front fence', 'Steel fence with arbor gate', 'Pool barrier in ornamental steel'],
};

/** Status by how long ago the lead came in (newer jobs are earlier in their life). */
function statusFor(daysAgo: number, r: ReturnType<typeof rng>): JobStatus {
  if (daysAgo < 20) return r.pick(['lead', 'lead', 'measured', 'bid_sent'] as const);
  if (daysAgo < 45) return r.pick(['measured', 'bid_sent', 'won', 'lost'] as const);
  if (daysAgo < 80) return r.pick(['won', 'building', 'building', 'lost'] as const);
  if (daysAgo < 140) return r.pick(['building', 'completed', 'completed', 'lost'] as const);
  return r.pick(['closed', 'closed', 'closed', 'completed', 'lost'] as const);
}

function isoDay(base: Date, minusDays: number): string {
  const d = new Date(base.getTime() - minusDays * 86_400_000);
  return d.toISOString().slice(0, 10);
}

export async function seedDemoCompany(knex: Knex, password: string, today = new Date()): Promise<void> {
  const exists = await knex('organization').where('id', DEMO.orgId).first('id');
  if (exists) return;
  const r = rng(DEMO.seed);
  const now = new Date(Math.floor(today.getTime() / 86_400_000) * 86_400_000);
  const created = new Date(now.getTime() - 548 * 86_400_000);
  const hash = await hashPassword(password);

  await knex('organization').insert({ id: DEMO.orgId, name: DEMO.name, slug: DEMO.slug, createdAt: created });
  for (const u of DEMO_USERS) {
    const existing = await knex('user').where('email', u.email).first('id');
    const userId = existing?.id ?? u.id;
    if (!existing) {
      await knex('user').insert({ id: userId, name: u.name, email: u.email, emailVerified: true, createdAt: created, updatedAt: created });
      await knex('account').insert({ id: `acc_${userId.slice(4)}`, accountId: userId, providerId: 'credential', userId, password: hash, createdAt: created, updatedAt: created });
    }
    await knex('member').insert({ id: `mem_${userId.slice(4)}`, organizationId: DEMO.orgId, userId, role: u.role, createdAt: created });
  }
  await knex('company_settings').insert({
    organization_id: DEMO.orgId,
    currency: 'USD',
    payment_terms_days: 15,
    target_margin_pct: 32,
    labour_burden_pct: 28,
    tax_mode: 'materials',
    tax_rate_pct: 7.375,
    bid_rounding_cents: 500,
    address_line: '418 Sawmill Rd',
    city: DEMO.town,
    region: DEMO.region,
    postal_code: '55990',
    phone: '555-0142',
    email: 'office@thornbury.example',
    license_number: 'BC-000000 (demo)',
  });
  await knex('fence_styles').insert(DEFAULT_STYLES.map((s) => ({ organization_id: DEMO.orgId, ...s })));
  const styles = await knex('fence_styles').where('organization_id', DEMO.orgId).orderBy('id').select('id', 'kind');

  const customerIds: number[] = [];
  for (let i = 0; i < 40; i++) {
    const business = i % 8 === 7 ? BUSINESSES[(i >> 3) % BUSINESSES.length] : null;
    const first = FIRST[(i * 7) % FIRST.length];
    const last = LAST[(i * 11) % LAST.length];
    const name = business ?? `${first} ${last}`;
    const street = `${r.int(100, 2999)} ${r.pick(STREETS)}`;
    const slug = name.toLowerCase().replace(/[^a-z]+/g, '.').replace(/^\.|\.$/g, '');
    const [id] = await knex('customers').insert({
      organization_id: DEMO.orgId,
      name,
      email: `${slug}@example.net`,
      phone: `555-01${String(10 + i).padStart(2, '0')}`,
      billing_line1: street,
      billing_city: DEMO.town,
      billing_region: DEMO.region,
      billing_postal: '55990',
      site_line1: street,
      site_city: DEMO.town,
      site_region: DEMO.region,
      site_postal: '55990',
      created_at: new Date(created.getTime() + i * 12 * 86_400_000),
    });
    customerIds.push(Number(id));
  }

  const estimator = DEMO_USERS[2].id;
  const crew = DEMO_USERS[3].id;
  for (let n = 1; n <= 60; n++) {
    const daysAgo = Math.round(((60 - n) / 59) * 540) + r.int(0, 6);
    const style = styles[(n * 5 + r.int(0, 2)) % styles.length];
    const status = n === 60 ? 'lead' : n === 59 ? 'measured' : statusFor(daysAgo, r);
    const leadDate = isoDay(now, daysAgo);
    const reached = (s: JobStatus[]) => s.includes(status);
    const customerId = customerIds[(n * 13) % customerIds.length];
    const cust = await knex('customers').where('id', customerId).first('site_line1', 'name');
    await knex('jobs').insert({
      organization_id: DEMO.orgId,
      code: formatJobCode(100 + n),
      title: r.pick(TITLES[style.kind] ?? ['Fence']),
      customer_id: customerId,
      fence_style_id: style.id,
      estimator_user_id: estimator,
      crew_lead_user_id: reached(['won', 'building', 'completed', 'closed']) && n % 3 !== 0 ? crew : null,
      status,
      commercial: /Storage|Apartments|Church|Kennel/.test(cust.name),
      site_line1: cust.site_line1,
      site_city: DEMO.town,
      site_region: DEMO.region,
      site_postal: '55990',
      lead_date: leadDate,
      measure_date: status === 'lead' ? null : isoDay(now, daysAgo - 3),
      bid_date: reached(['bid_sent', 'won', 'lost', 'building', 'completed', 'closed']) ? isoDay(now, daysAgo - 7) : null,
      decided_date: reached(['won', 'lost', 'building', 'completed', 'closed']) ? isoDay(now, daysAgo - 14) : null,
      start_date: reached(['building', 'completed', 'closed']) ? isoDay(now, daysAgo - 30) : null,
      completed_date: reached(['completed', 'closed']) ? isoDay(now, daysAgo - 36) : null,
      closed_date: reached(['closed']) ? isoDay(now, daysAgo - 70) : null,
      notes: n % 4 === 0 ? 'Dog in the yard; latch the gate behind you.' : null,
      created_by: estimator,
      created_at: new Date(now.getTime() - daysAgo * 86_400_000),
      updated_at: new Date(now.getTime() - Math.max(0, daysAgo - 36) * 86_400_000),
    });
  }
  await knex('company_settings').where('organization_id', DEMO.orgId).update({ next_job_number: 161 });
  await seedInterimEstimates(knex, r);
}

/** Rough dollars per linear foot by style, for the interim contract prices below. */
const PRICE_PER_FOOT: Record<string, number> = { wood_privacy: 42, split_rail: 22, wire_panel: 34, chain_link: 26, vinyl: 48, ornamental: 58 };
/** Share of cost by category for a typical residential fence (common practice, no source). */
const COST_SHARES: [string, number][] = [['material', 0.52], ['labour', 0.38], ['rental', 0.05], ['permit', 0.02], ['disposal', 0.03]];

/**
 * Every won job gets a contract price and an estimated cost by category, so costing and
 * billing have something to stand on. The bids seed replaces both with what the accepted
 * bid priced.
 */
async function seedInterimEstimates(knex: Knex, r: ReturnType<typeof rng>): Promise<void> {
  const jobs = await knex('jobs as j')
    .join('fence_styles as s', 's.id', 'j.fence_style_id')
    .where('j.organization_id', DEMO.orgId)
    .whereIn('j.status', ['won', 'building', 'completed', 'closed'])
    .orderBy('j.id')
    .select('j.id', 's.kind');
  const rows: Record<string, unknown>[] = [];
  for (const job of jobs) {
    const feet = r.int(80, 420);
    const contract = Math.round((feet * (PRICE_PER_FOOT[job.kind] ?? 35) * 100) / 500) * 500;
    const cost = Math.round(contract * 0.68);
    await knex('jobs').where('id', job.id).update({ contract_cents: contract });
    // The last category takes the remainder, so the parts sum exactly to the cost.
    let left = cost;
    COST_SHARES.forEach(([category, share], i) => {
      const amount = i === COST_SHARES.length - 1 ? left : Math.round(cost * share);
      left -= amount;
      rows.push({ organization_id: DEMO.orgId, job_id: job.id, category, amount_cents: amount, source: 'bid' });
    });
  }
  if (rows.length) await knex('job_estimates').insert(rows);
}
