import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeCompany, makeCustomer, makeJob, type TestCompany } from '../setup/factory';
import { closeTestDb, testDb } from '../setup/db';
import { mailTo, waitForMail } from '../setup/mail';
import { billableJob, draft, getInvoice, issue, send, waitFor } from '../setup/invoices';
import { parseCsv } from '../../src/lib/csv/tokenizer';

let co: TestCompany;
beforeAll(async () => {
  co = await makeCompany();
  const { job } = await billableJob(co);
  companyToday = (await draft(co.owner, { jobId: job.id, kind: 'deposit', basisPct: 5 })).today;
});
afterAll(closeTestDb);

// The company's today (its time zone), as the invoice page reports it.
let companyToday = '';
const today = () => companyToday;

async function openInvoice(contract = 1_000_000, pct = 20) {
  const j = await billableJob(co, contract);
  const inv = await issue(co.owner, (await draft(co.owner, { jobId: j.job.id, kind: 'deposit', basisPct: pct })).id);
  return { ...j, inv };
}

describe('manual payments', () => {
  it('takes partial payments by check, then the rest, and mails a receipt for each', async () => {
    const { inv, email } = await openInvoice();
    const a = await co.bookkeeper.post(`/api/invoices/${inv.id}/payments`, { amountCents: 50_000, method: 'check', receivedOn: today(), reference: 'Check 1042' });
    expect(a.status).toBe(201);
    expect(a.body.invoice.status).toBe('partly_paid');
    expect(a.body.invoice.balanceCents).toBe(inv.totalCents - 50_000);
    const b = await co.bookkeeper.post(`/api/invoices/${inv.id}/payments`, { amountCents: inv.totalCents - 50_000, method: 'bank_transfer', receivedOn: today() });
    expect(b.body.invoice.status).toBe('paid');
    const mails = await waitForMail(email, 2);
    expect(mails.filter((m) => /Payment received/.test(m.subject))).toHaveLength(2);
    expect((await co.bookkeeper.post(`/api/invoices/${inv.id}/payments`, { amountCents: 100, method: 'cash', receivedOn: today() })).status).toBe(422);
  });

  it('refuses an overpayment with a clear message unless it is kept as credit', async () => {
    const { inv, customer } = await openInvoice();
    const over = await co.owner.post(`/api/invoices/${inv.id}/payments`, { amountCents: inv.totalCents + 2_500, method: 'check', receivedOn: today() });
    expect(over.status).toBe(422);
    expect(over.body.error.code).toBe('OVERPAYMENT');
    expect(over.body.error.message).toContain('$25.00 more than');
    expect(over.body.error.fields.amountCents).toBeTruthy();
    const credit = await co.owner.post(`/api/invoices/${inv.id}/payments`, { amountCents: inv.totalCents + 2_500, method: 'check', receivedOn: today(), asCredit: true });
    expect(credit.status).toBe(201);
    expect(credit.body.invoice.status).toBe('paid');
    const row = await testDb()('payments').where({ organization_id: co.id, invoice_id: inv.id }).first();
    expect([Number(row.applied_cents), Number(row.credit_cents)]).toEqual([inv.totalCents, 2_500]);
    void customer;
  });

  it('lets two people record the same payment at the same moment and counts it once', async () => {
    const { inv } = await openInvoice();
    const both = await Promise.all([co.owner, co.bookkeeper, co.owner, co.bookkeeper].map((c) => c.post(`/api/invoices/${inv.id}/payments`, { amountCents: inv.totalCents, method: 'check', receivedOn: today(), reference: 'Check 2210' })));
    expect(both.map((r) => r.status).sort()).toEqual([201, 422, 422, 422]);
    const rows = await testDb()('payments').where({ organization_id: co.id, invoice_id: inv.id });
    expect(rows).toHaveLength(1);
    const after = await getInvoice(co.owner, inv.id);
    expect(after.paidCents).toBe(inv.totalCents);
    // Many small payments at once: each lands, and their sum is exactly what the invoice shows.
    const { inv: inv2 } = await openInvoice(1_000_000, 10);
    const parts = await Promise.all(Array.from({ length: 6 }, (_, i) => (i % 2 ? co.owner : co.bookkeeper).post(`/api/invoices/${inv2.id}/payments`, { amountCents: 10_000, method: 'cash', receivedOn: today() })));
    expect(parts.every((r) => r.status === 201)).toBe(true);
    const sum = await testDb()('payments').where({ invoice_id: inv2.id }).sum({ s: 'applied_cents' }).first();
    expect(Number(sum!.s)).toBe(60_000);
    expect((await getInvoice(co.owner, inv2.id)).paidCents).toBe(60_000);
  });

  it('refuses a payment dated in the future, a draft, and a void invoice', async () => {
    const { inv, job } = await openInvoice();
    const fut = await co.owner.post(`/api/invoices/${inv.id}/payments`, { amountCents: 100, method: 'check', receivedOn: '2999-01-01' });
    expect(fut.status).toBe(400);
    expect(fut.body.error.fields.receivedOn).toBeTruthy();
    const d = await draft(co.owner, { jobId: job.id, kind: 'progress', basisPct: 50 });
    expect((await co.owner.post(`/api/invoices/${d.id}/payments`, { amountCents: 100, method: 'check', receivedOn: today() })).status).toBe(422);
    await co.owner.post(`/api/invoices/${inv.id}/void`, { reason: 'Duplicate' });
    expect((await co.owner.post(`/api/invoices/${inv.id}/payments`, { amountCents: 100, method: 'check', receivedOn: today() })).status).toBe(422);
  });

  it('refunds a manual payment in part and the invoice is owed again; voiding needs the money back first', async () => {
    const { inv } = await openInvoice();
    const p = await co.owner.post(`/api/invoices/${inv.id}/payments`, { amountCents: inv.totalCents, method: 'check', receivedOn: today() });
    const payId = p.body.paymentId;
    expect((await co.owner.post(`/api/invoices/${inv.id}/void`, { reason: 'x y z' })).status).toBe(422);
    const r = await co.owner.post(`/api/invoices/${inv.id}/payments/${payId}/refund`, { amountCents: 30_000, reason: 'Short a gate' });
    expect(r.status).toBe(200);
    expect(r.body.status).toBe('partly_paid');
    expect(r.body.balanceCents).toBe(30_000);
    // Collected to date in SQL: payments applied less refunds.
    const [[row]] = await testDb().raw(
      'SELECT (SELECT SUM(applied_cents) FROM payments WHERE invoice_id = ?) - (SELECT COALESCE(SUM(amount_cents), 0) FROM refunds WHERE invoice_id = ?) AS collected',
      [inv.id, inv.id],
    );
    expect(Number(row.collected)).toBe(inv.totalCents - 30_000);
  });
});

describe('receivables export', () => {
  it('totals each aging bucket and each customer under the rows, and neutralises formula-looking names', async () => {
    const rc = await makeCompany();
    const ago = (n: number) => new Date(Date.now() - n * 86_400_000).toISOString().slice(0, 10);
    const evilName = '=HYPERLINK("http://evil.example","Pay here")';
    const a = await makeCustomer(rc.owner, evilName);
    const b = await makeCustomer(rc.owner, 'Birch Row Builders');
    /** An issued deposit for the customer, due some days ago (negative: not yet due), part paid or not. */
    const open = async (customerId: number, requestedCents: number, dueDaysAgo: number, paidCents = 0) => {
      const job = await makeJob(rc.owner, customerId, { status: 'won' });
      await testDb()('jobs').where({ id: job.id, organization_id: rc.id }).update({ contract_cents: 1_000_000 });
      await testDb()('job_estimates').insert({ organization_id: rc.id, job_id: job.id, category: 'labour', amount_cents: 700_000, source: 'bid' });
      const inv = await issue(rc.owner, (await draft(rc.owner, { jobId: job.id, kind: 'deposit', requestedCents })).id);
      if (paidCents) expect((await rc.owner.post(`/api/invoices/${inv.id}/payments`, { amountCents: paidCents, method: 'check', receivedOn: inv.today })).status).toBe(201);
      await testDb()('invoices').where({ id: inv.id, organization_id: rc.id }).update({ issued_on: ago(dueDaysAgo + 15), due_on: ago(dueDaysAgo) });
      return inv.totalCents - paidCents;
    };
    // Customer A: one not yet due, one 45 days past due; customer B: 100 days, and 10 days part paid.
    const a1 = await open(a.id, 100_000, -5);
    const a2 = await open(a.id, 104_500, 45);
    const b1 = await open(b.id, 110_000, 100);
    const b2 = await open(b.id, 101_000, 10, 40_000);

    const res = await rc.bookkeeper.get('/api/receivables?format=csv');
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toContain('text/csv');
    const rows = parseCsv(res.text).map((r) => r.cells);
    const [head, ...body] = rows;
    const col = (name: string) => head.indexOf(name);
    const invoiceRows = body.filter((r) => /^INV-/.test(r[0]));
    expect(invoiceRows).toHaveLength(4);
    const cents = (v: string) => Math.round(Number(v) * 100);
    const total = (first: string, label: string, at: number) => body.find((r) => r[0] === first && r[at] === label)?.[col('Balance')];
    // Each bucket's total row is the sum of the invoice rows in that bucket, and what was billed.
    const expected: Record<string, number> = { Current: a1, '1–30 days': b2, '31–60 days': a2, '61–90 days': 0, 'Over 90 days': b1 };
    for (const [label, want] of Object.entries(expected)) {
      const fromRows = invoiceRows.filter((r) => r[col('Aging')] === label).reduce((s, r) => s + cents(r[col('Balance')]), 0);
      expect(fromRows, label).toBe(want);
      expect(cents(total('Total', label, col('Aging'))!), label).toBe(want);
    }
    expect(cents(total('Total', 'All', col('Aging'))!)).toBe(a1 + a2 + b1 + b2);
    // Per customer, and the formula-looking name is text, never a formula.
    expect(cents(total('Customer total', `'${evilName}`, col('Customer'))!)).toBe(a1 + a2);
    expect(cents(total('Customer total', 'Birch Row Builders', col('Customer'))!)).toBe(b1 + b2);
    expect(invoiceRows.filter((r) => r[col('Customer')] === `'${evilName}`)).toHaveLength(2);
    expect(rows.flat().some((c) => /^[=+@\t\r]/.test(c) || /^-[^0-9]/.test(c))).toBe(false);
    expect(res.text).not.toMatch(/(^|,)=HYPERLINK/m);
  });
});

describe('reminders', () => {
  it('sends each scheduled reminder once, and none after the invoice is paid', async () => {
    const { job, email } = await billableJob(co);
    const inv = await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'deposit', basisPct: 10 })).id);
    await send(co.owner, inv.id);
    await waitForMail(email, 1);
    // Move the invoice back in time: issued 30 days ago, due 15 days ago (past the +7 and +14 marks).
    const ago = (n: number) => new Date(Date.now() - n * 86_400_000).toISOString().slice(0, 10);
    await testDb()('invoices').where({ id: inv.id }).update({ issued_on: ago(30), due_on: ago(15) });
    const got = await waitForMail(email, 2, 30_000);
    const reminders = got.filter((m) => /^Reminder/.test(m.subject));
    expect(reminders).toHaveLength(1);
    expect(reminders[0].subject).toContain('14 days past due');
    const rows = await waitFor(() => testDb()('invoice_reminders').where({ invoice_id: inv.id }), (r) => r.length === 1);
    expect(rows[0].offset_days).toBe(14);
    await co.owner.post(`/api/invoices/${inv.id}/payments`, { amountCents: inv.totalCents, method: 'check', receivedOn: today() });
    await testDb()('invoices').where({ id: inv.id }).update({ issued_on: ago(40), due_on: ago(31) });
    await testDb()('company_settings').where({ organization_id: co.id }).update({ reminder_offsets: '-3,0,7,14,30' });
    await new Promise((r) => setTimeout(r, 7_000));
    const after = await mailTo(email);
    expect(after.filter((m) => /^Reminder/.test(m.subject))).toHaveLength(1);
  });
});
