import { randomBytes } from 'node:crypto';
import type { Knex } from 'knex';
import { hashPassword } from 'better-auth/crypto';
import { rng } from '../../lib/random.ts';
import { formatJobCode } from '../../lib/jobs/schema.ts';
import { DEFAULT_STYLES } from '../services/company-defaults.ts';

/**
 * A large invented company for load tests and benchmarks: ten years of work, about 5,000
 * jobs and a million cost lines (receipt lines, crew hours and rentals together). Written
 * with multi-row inserts; nothing here is demo data people click through.
 */
export const LARGE = {
  orgId: 'org_bench_large_0000000000000001',
  slug: 'bench-large-company',
  name: 'Harrowgate Fence Works (benchmark)',
  ownerEmail: 'bench-owner@example.com',
};

export interface LargeOptions {
  jobs: number;
  /** Total of cost_lines + time_entries + rentals. */
  costLines: number;
  password: string;
  today?: Date;
  onProgress?: (what: string, done: number, total: number) => void;
}

const DAY = 86_400_000;
const iso = (t: number) => new Date(t).toISOString().slice(0, 10);

async function insertBatches(k: Knex, table: string, rows: Record<string, unknown>[], size = 2000): Promise<void> {
  for (let i = 0; i < rows.length; i += size) await k(table).insert(rows.slice(i, i + size));
}

export async function seedLargeCompany(k: Knex, o: LargeOptions): Promise<{ jobs: number; costLines: number; timeEntries: number; rentals: number }> {
  if (await k('organization').where('id', LARGE.orgId).first('id')) {
    const [[c]] = await k.raw('SELECT (SELECT COUNT(*) FROM jobs WHERE organization_id = ?) AS j, (SELECT COUNT(*) FROM cost_lines WHERE organization_id = ?) AS c, (SELECT COUNT(*) FROM time_entries WHERE organization_id = ?) AS t, (SELECT COUNT(*) FROM rentals WHERE organization_id = ?) AS r', [LARGE.orgId, LARGE.orgId, LARGE.orgId, LARGE.orgId]);
    return { jobs: Number(c.j), costLines: Number(c.c), timeEntries: Number(c.t), rentals: Number(c.r) };
  }
  const r = rng(424242);
  const today = Math.floor((o.today ?? new Date()).getTime() / DAY) * DAY;
  const start = today - 3650 * DAY;
  const created = new Date(start);
  const ownerId = 'usr_bench_owner_00000000000001';
  await k('organization').insert({ id: LARGE.orgId, name: LARGE.name, slug: LARGE.slug, createdAt: created });
  await k('user').insert({ id: ownerId, name: 'Bench Owner', email: LARGE.ownerEmail, emailVerified: true, createdAt: created, updatedAt: created });
  await k('account').insert({ id: 'acc_bench_owner_0000000000001', accountId: ownerId, providerId: 'credential', userId: ownerId, password: await hashPassword(o.password), createdAt: created, updatedAt: created });
  await k('member').insert({ id: 'mem_bench_owner_0000000000001', organizationId: LARGE.orgId, userId: ownerId, role: 'owner', createdAt: created });
  await k('company_settings').insert({ organization_id: LARGE.orgId, labour_burden_pct: 28, target_margin_pct: 30, tax_mode: 'materials', tax_rate_pct: 6.5, next_job_number: o.jobs + 1 });
  await k('fence_styles').insert(DEFAULT_STYLES.map((s) => ({ organization_id: LARGE.orgId, ...s })));
  const styles = (await k('fence_styles').where('organization_id', LARGE.orgId).orderBy('id').select('id')).map((s) => Number(s.id));

  const customers = Array.from({ length: Math.ceil(o.jobs / 2.5) }, (_, i) => ({ organization_id: LARGE.orgId, name: `Bench customer ${i + 1}`, email: `c${i + 1}@bench.example`, billing_city: 'Harrowgate' }));
  await insertBatches(k, 'customers', customers);
  const customerIds = (await k('customers').where('organization_id', LARGE.orgId).orderBy('id').select('id')).map((c) => Number(c.id));
  const workers = Array.from({ length: 24 }, (_, i) => ({ organization_id: LARGE.orgId, name: `Bench worker ${i + 1}`, wage_cents: 2200 + (i % 8) * 150 }));
  await insertBatches(k, 'workers', workers);
  const workerIds = (await k('workers').where('organization_id', LARGE.orgId).orderBy('id').select('id', 'wage_cents')).map((w) => ({ id: Number(w.id), wage: Number(w.wage_cents) }));

  const jobs = [];
  for (let n = 1; n <= o.jobs; n++) {
    const lead = start + Math.floor((n / o.jobs) * 3600) * DAY;
    const open = today - lead < 90 * DAY;
    jobs.push({
      organization_id: LARGE.orgId,
      code: formatJobCode(n),
      title: `Bench job ${n}`,
      customer_id: customerIds[n % customerIds.length],
      fence_style_id: styles[n % styles.length],
      status: open ? r.pick(['won', 'building', 'building', 'completed'] as const) : r.chance(0.12) ? 'lost' : 'closed',
      lead_date: iso(lead),
      start_date: iso(lead + 20 * DAY),
      completed_date: open ? null : iso(lead + 35 * DAY),
      contract_cents: r.int(300_000, 3_000_000),
      created_at: new Date(lead),
      updated_at: new Date(lead + 35 * DAY),
    });
  }
  await insertBatches(k, 'jobs', jobs);
  const jobRows = (await k('jobs').where('organization_id', LARGE.orgId).orderBy('id').select('id', 'status', 'contract_cents', 'start_date')) as { id: number; status: string; contract_cents: number; start_date: string }[];
  const worked = jobRows.filter((j) => j.status !== 'lost');

  const estimates: Record<string, unknown>[] = [];
  for (const j of worked) {
    const cost = Math.round(Number(j.contract_cents) * 0.7);
    const m = Math.round(cost * 0.5);
    const l = Math.round(cost * 0.4);
    estimates.push(
      { organization_id: LARGE.orgId, job_id: j.id, category: 'material', amount_cents: m, source: 'bid' },
      { organization_id: LARGE.orgId, job_id: j.id, category: 'labour', amount_cents: l, source: 'bid' },
      { organization_id: LARGE.orgId, job_id: j.id, category: 'rental', amount_cents: cost - m - l, source: 'bid' },
    );
  }
  await insertBatches(k, 'job_estimates', estimates);

  // Share of the lines: 90 % receipt lines, 8 % crew hours, 2 % rentals.
  const target = { cost: Math.round(o.costLines * 0.9), time: Math.round(o.costLines * 0.08) };
  const rentalsTotal = o.costLines - target.cost - target.time;
  const CATS = ['material', 'material', 'material', 'material', 'permit', 'disposal', 'subcontract', 'other'] as const;
  const batch: Record<string, unknown>[] = [];
  let made = 0;
  for (let i = 0; i < target.cost; i++) {
    const j = worked[i % worked.length];
    const d = Date.parse(`${j.start_date}T00:00:00Z`) + (i % 20) * DAY;
    batch.push({
      organization_id: LARGE.orgId, source: 'manual', job_id: j.id, overhead: false, category: CATS[i % CATS.length], cost_date: iso(d),
      description: 'Bench line', sku: `SKU-${i % 400}`, quantity: 1 + (i % 9), unit: 'EA', amount_cents: 500 + ((i * 7919) % 40_000),
    });
    if (batch.length === 5000) {
      await k('cost_lines').insert(batch.splice(0));
      made += 5000;
      o.onProgress?.('cost lines', made, target.cost);
    }
  }
  if (batch.length) await k('cost_lines').insert(batch.splice(0));
  const tasks = ['dig_set_posts', 'rails_infill', 'gates', 'cleanup'] as const;
  for (let i = 0; i < target.time; i++) {
    const j = worked[i % worked.length];
    const w = workerIds[i % workerIds.length];
    const hours = 4 + (i % 9) / 2;
    batch.push({
      organization_id: LARGE.orgId, job_id: j.id, worker_id: w.id, work_date: iso(Date.parse(`${j.start_date}T00:00:00Z`) + (i % 10) * DAY), hours, task: tasks[i % 4],
      wage_cents: w.wage, burden_pct: 28, cost_cents: Math.round(hours * w.wage * 1.28),
    });
    if (batch.length === 5000) await k('time_entries').insert(batch.splice(0));
  }
  if (batch.length) await k('time_entries').insert(batch.splice(0));
  for (let i = 0; i < rentalsTotal; i++) {
    const j = worked[i % worked.length];
    const s = Date.parse(`${j.start_date}T07:00:00Z`);
    batch.push({
      organization_id: LARGE.orgId, job_id: j.id, kind: 'earth_auger', start_at: new Date(s).toISOString().slice(0, 19).replace('T', ' '), end_at: new Date(s + 9 * 3_600_000).toISOString().slice(0, 19).replace('T', ' '),
      day_cents: 9500, delivery_cents: 0, fuel_cents: 0, days: 1, cost_cents: 9500,
    });
    if (batch.length === 5000) await k('rentals').insert(batch.splice(0));
  }
  if (batch.length) await k('rentals').insert(batch.splice(0));

  // One final invoice per finished job; the last few months' still open, for receivables.
  let number = 0;
  const invoices: Record<string, unknown>[] = [];
  for (const j of worked) {
    number++;
    const issued = Date.parse(`${j.start_date}T00:00:00Z`) + 40 * DAY;
    if (issued > today) continue;
    const total = Number(j.contract_cents);
    const open = today - issued < 150 * DAY && number % 3 === 0;
    invoices.push({
      organization_id: LARGE.orgId, job_id: j.id, customer_id: customerIds[number % customerIds.length], kind: 'final', status: open ? 'issued' : 'paid',
      number, number_text: `INV-${String(number).padStart(5, '0')}`, issued_on: iso(issued), due_on: iso(issued + 30 * DAY), terms: 'net_30', terms_days: 30,
      tax_mode: 'none', tax_rate_pct: 0, subtotal_cents: total, contract_billed_cents: total, total_cents: total, paid_cents: open ? 0 : total,
      public_nonce: randomBytes(32).toString('base64url'),
    });
  }
  await insertBatches(k, 'invoices', invoices, 1000);
  await k('company_settings').where('organization_id', LARGE.orgId).update({ next_invoice_number: number + 1 });
  return { jobs: jobRows.length, costLines: target.cost, timeEntries: target.time, rentals: rentalsTotal };
}
