import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeCompany, type TestCompany } from '../setup/factory';
import { closeTestDb, testDb } from '../setup/db';
import { billableJob, draft, getInvoice, issue } from '../setup/invoices';
import { pdfText } from '../setup/pdf';
import { stack } from '../setup/stack';

let co: TestCompany;
let other: TestCompany;
beforeAll(async () => {
  [co, other] = await Promise.all([makeCompany(), makeCompany()]);
  // Tax on materials only at 8.25 %; the contract lines split by the estimate (55 % materials).
  expect((await co.owner.patch('/api/settings', { taxMode: 'materials', taxRatePct: 8.25 })).status).toBe(200);
});
afterAll(closeTestDb);

const settings = (c: TestCompany, patch: Record<string, unknown>) =>
  c.owner.request('PUT', '/api/reminders/settings', { json: { depositCapPct: null, depositCapCents: null, defaultRetainagePct: 10, paymentTermsDays: 15, invoicePrefix: 'INV', remindersEnabled: true, reminderOffsets: '-3,0,7,14', ...patch } });

describe('who may do what', () => {
  it('bookkeeper drafts, only the owner issues, estimator and crew lead see nothing', async () => {
    const { job } = await billableJob(co);
    const body = { jobId: job.id, kind: 'deposit', basisPct: 10, terms: 'net_15' };
    const d = await co.bookkeeper.post('/api/invoices', body);
    expect(d.status).toBe(201);
    expect(d.body.number).toBeNull();
    expect((await co.bookkeeper.post(`/api/invoices/${d.body.id}/issue`)).status).toBe(403);
    expect((await co.estimator.post('/api/invoices', body)).status).toBe(403);
    expect((await co.crew_lead.get('/api/invoices')).status).toBe(403);
    expect((await co.estimator.get(`/api/invoices/${d.body.id}`)).status).toBe(403);
    expect((await co.crew_lead.get('/api/receivables')).status).toBe(403);
    expect((await co.owner.post(`/api/invoices/${d.body.id}/issue`)).status).toBe(200);
  });

  it("another company's invoice is 404, and a job of another company cannot be billed", async () => {
    const { job } = await billableJob(co);
    const inv = await draft(co.owner, { jobId: job.id, kind: 'deposit', basisPct: 10 });
    expect((await other.owner.get(`/api/invoices/${inv.id}`)).status).toBe(404);
    expect((await other.owner.post(`/api/invoices/${inv.id}/issue`)).status).toBe(404);
    expect((await other.owner.post(`/api/invoices/${inv.id}/payments`, { amountCents: 100, method: 'check', receivedOn: '2026-01-02' })).status).toBe(404);
    const r = await other.owner.post('/api/invoices', { jobId: job.id, kind: 'deposit', basisPct: 10, terms: 'net_15' });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.jobId).toBeTruthy();
  });

  it('answers bad input with field errors, never a 500', async () => {
    const { job } = await billableJob(co);
    const cases: [Record<string, unknown>, string][] = [
      [{ jobId: job.id, kind: 'progress', terms: 'net_15' }, 'basisPct'],
      [{ jobId: job.id, kind: 'deposit', basisPct: 10, requestedCents: 500, terms: 'net_15' }, 'requestedCents'],
      [{ jobId: job.id, kind: 'deposit', basisPct: 120, terms: 'net_15' }, 'basisPct'],
      [{ jobId: job.id, kind: 'extra', terms: 'net_15' }, 'lines'],
      [{ jobId: job.id, kind: 'extra', terms: 'net_15', lines: [{ description: 'x', category: 'labour', quantity: 1, unitPriceCents: 10.5 }] }, 'lines.0.unitPriceCents'],
      [{ jobId: job.id, kind: 'deposit', basisPct: 10, terms: 'custom' }, 'termsDays'],
      [{ jobId: job.id, kind: 'deposit', basisPct: 10, terms: 'net_15', overContractOk: true }, 'overrideReason'],
      [{ jobId: 'abc', kind: 'deposit', basisPct: 10, terms: 'net_15' }, 'jobId'],
      [{ jobId: job.id, kind: 'deposit', basisPct: 10, terms: 'net_15', organizationId: other.id }, '_'],
    ];
    for (const [body, field] of cases) {
      const r = await co.owner.post('/api/invoices', body);
      expect(r.status, JSON.stringify(body)).toBe(400);
      if (field !== '_') expect(Object.keys(r.body.error.fields), JSON.stringify(body)).toContain(field);
    }
    expect((await co.owner.get('/api/invoices/abc')).status).toBe(404);
  });
});

describe('deposit, progress with retainage, change order and final', () => {
  it('bills a commercial job to exactly its contract plus change orders, retainage last', async () => {
    const { job } = await billableJob(co, 2_000_000, { commercial: true });
    // Deposit 10 % of $20,000 = $2,000.00, split 55/45 by the estimate; tax 8.25 % on the $1,100.00 materials part = $90.75.
    const dep = await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'deposit', basisPct: 10 })).id);
    expect(dep.numberText).toMatch(/^INV-\d{4}$/);
    expect(dep.subtotalCents).toBe(200_000);
    expect(dep.lines.map((l: { amountCents: number }) => l.amountCents)).toEqual([110_000, 90_000]);
    expect(dep.taxCents).toBe(9_075);
    expect(dep.retainageHeldCents).toBe(0);
    expect(dep.totalCents).toBe(209_075);

    // A change order approved by the customer adds $1,500 and writes its cost to job_estimates.
    const c = await co.bookkeeper.post('/api/change-orders', { jobId: job.id, description: 'Add a 4 ft walk gate', priceCents: 150_000, costs: { material: 60_000, labour: 30_000 } });
    expect(c.status).toBe(201);
    expect(c.body.label).toBe('CO-1');
    const ok = await co.bookkeeper.post(`/api/change-orders/${c.body.id}/decision`, { decision: 'approved', decidedOn: '2026-03-02', approvedByName: 'Pat Customer' });
    expect(ok.status).toBe(200);
    const est = await testDb()('job_estimates').where({ organization_id: co.id, job_id: job.id, source: 'change_order', source_id: c.body.id }).orderBy('category');
    expect(est.map((e) => [e.category, Number(e.amount_cents)]).sort()).toEqual([['labour', 30_000], ['material', 60_000]]);
    expect(await testDb()('job_estimates').where({ job_id: job.id, source: 'bid' }).count({ n: '*' }).first()).toEqual({ n: 2 });

    // Progress to 50 % of $21,500 = $10,750 earned, less $2,000 billed = $8,750; retainage 10 % = $875.00.
    const prog = await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'progress', basisPct: 50 })).id);
    expect(prog.contractBilledCents).toBe(875_000);
    expect(prog.retainagePct).toBe(10);
    expect(prog.retainageHeldCents).toBe(87_500);
    expect(prog.totalCents).toBe(875_000 + prog.taxCents - 87_500);

    // The change order billed whole on its own invoice; it cannot go on a second one.
    const extra = await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'extra', changeOrderIds: [c.body.id] })).id);
    expect(extra.subtotalCents).toBe(150_000);
    const again = await co.owner.post('/api/invoices', { jobId: job.id, kind: 'extra', terms: 'net_15', changeOrderIds: [c.body.id] });
    expect(again.status).toBe(409);

    // Final: $21,500 − $2,000 − $8,750 − $1,500 = $9,250 left, plus the $875 retainage released (untaxed).
    const fin = await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'final' })).id);
    expect(fin.contractBilledCents).toBe(925_000);
    expect(fin.retainageReleasedCents).toBe(87_500);
    expect(fin.retainageHeldCents).toBe(0);
    expect(fin.totalCents).toBe(925_000 + fin.taxCents + 87_500);
    const [{ billed, held, released }] = (await testDb().raw(
      "SELECT SUM(contract_billed_cents) AS billed, SUM(retainage_held_cents) AS held, SUM(retainage_released_cents) AS released FROM invoices WHERE organization_id = ? AND job_id = ? AND status <> 'void' AND status <> 'draft'",
      [co.id, job.id],
    ))[0];
    expect(Number(billed)).toBe(2_150_000);
    expect(Number(held) - Number(released)).toBe(0);

    // Anything more is past the contract: refused at issue unless overridden with a reason.
    const over = await draft(co.owner, { jobId: job.id, kind: 'extra', lines: [{ description: 'Extra post', category: 'material', quantity: 2, unitPriceCents: 4_500 }] });
    expect(over.warnings.map((w: { code: string }) => w.code)).toContain('OVER_CONTRACT');
    const refused = await co.owner.post(`/api/invoices/${over.id}/issue`);
    expect(refused.status).toBe(422);
    expect(refused.body.error.code).toBe('OVER_CONTRACT');
    const patched = await co.owner.patch(`/api/invoices/${over.id}`, { kind: 'extra', terms: 'net_15', lines: [{ description: 'Extra post', category: 'material', quantity: 2, unitPriceCents: 4_500 }], overContractOk: true, overrideReason: 'Customer asked on site; signed slip in the truck' });
    expect(patched.status).toBe(200);
    expect((await co.owner.post(`/api/invoices/${over.id}/issue`)).status).toBe(200);
  });

  it('flags a deposit over the cap and issues it only with a reason', async () => {
    const c = await makeCompany();
    expect((await settings(c, { depositCapPct: 10, depositCapCents: 100_000 })).status).toBe(200);
    const { job } = await billableJob(c, 800_000);
    // $8,000 contract: cap = lesser of 10 % ($800) and $1,000 → $800 (Cal. Bus. & Prof. Code §7159.5(a)(3)).
    const d = await draft(c.owner, { jobId: job.id, kind: 'deposit', basisPct: 25 });
    expect(d.warnings.map((w: { code: string }) => w.code)).toEqual(['DEPOSIT_OVER_CAP']);
    const r = await c.owner.post(`/api/invoices/${d.id}/issue`);
    expect(r.status).toBe(422);
    expect(r.body.error.code).toBe('DEPOSIT_OVER_CAP');
    expect(r.body.error.message).toContain('$800.00');
    const ok = await draft(c.owner, { jobId: job.id, kind: 'deposit', requestedCents: 80_000 });
    expect(ok.warnings).toEqual([]);
    expect((await c.owner.post(`/api/invoices/${ok.id}/issue`)).status).toBe(200);
  });

  it('refuses a progress bill with nothing left to bill', async () => {
    const { job } = await billableJob(co, 1_000_000);
    await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'deposit', basisPct: 30 })).id);
    const r = await co.owner.post('/api/invoices', { jobId: job.id, kind: 'progress', basisPct: 20, terms: 'net_15' });
    expect(r.status).toBe(422);
    expect(r.body.error.message).toContain('nothing to bill');
  });
});

describe('issued invoices', () => {
  it('are not edited, only voided with a reason and replaced, and the trail says who did what', async () => {
    const { job } = await billableJob(co);
    const inv = await issue(co.owner, (await draft(co.bookkeeper, { jobId: job.id, kind: 'deposit', basisPct: 10 })).id);
    const edit = await co.owner.patch(`/api/invoices/${inv.id}`, { kind: 'deposit', basisPct: 20, terms: 'net_15' });
    expect(edit.status).toBe(409);
    expect(edit.body.error.code).toBe('INVOICE_NOT_DRAFT');
    expect((await co.owner.post(`/api/invoices/${inv.id}/void`, { reason: '' })).status).toBe(400);
    const v = await co.owner.post(`/api/invoices/${inv.id}/void`, { reason: 'Wrong percent', replace: true });
    expect(v.status).toBe(200);
    expect(v.body.invoice.status).toBe('void');
    expect(v.body.invoice.balanceCents).toBe(0);
    const rep = await getInvoice(co.owner, v.body.replacementId);
    expect(rep.status).toBe('draft');
    expect(rep.replacesInvoiceId).toBe(inv.id);
    const after = await getInvoice(co.owner, inv.id);
    expect(after.history.map((h: { action: string }) => h.action)).toEqual(['draft', 'issue', 'void']);
    expect(after.history[0].who).toBe('Test bookkeeper');
    expect(after.history[2].detail.reason).toBe('Wrong percent');
    expect((await co.owner.post(`/api/invoices/${inv.id}/void`, { reason: 'again' })).status).toBe(409);
  });

  it('numbers invoices without gaps when many are issued at once, failures included', async () => {
    const c = await makeCompany();
    const { job } = await billableJob(c, 10_000_000);
    const good = await Promise.all(Array.from({ length: 8 }, () => draft(c.owner, { jobId: job.id, kind: 'extra', lines: [{ description: 'Section', category: 'labour', quantity: 1, unitPriceCents: 10_000 }] })));
    const bad = await draft(c.owner, { jobId: job.id, kind: 'extra', lines: [{ description: 'Far too much', category: 'labour', quantity: 1, unitPriceCents: 20_000_000 }] });
    const results = await Promise.all([...good, bad].map((d) => c.owner.post(`/api/invoices/${d.id}/issue`)));
    expect(results.filter((r) => r.status === 200)).toHaveLength(8);
    expect(results[8].status).toBe(422);
    const numbers = results.filter((r) => r.status === 200).map((r) => r.body.number as number).sort((a, b) => a - b);
    expect(numbers).toEqual([1, 2, 3, 4, 5, 6, 7, 8]);
    const next = await issue(c.owner, (await draft(c.owner, { jobId: job.id, kind: 'extra', lines: [{ description: 'One more', category: 'labour', quantity: 1, unitPriceCents: 100 }] })).id);
    expect(next.numberText).toBe('INV-0009');
  });

  it('reads "Issued, not sent" until the invoice is e-mailed, on the invoice and the job', async () => {
    const { job } = await billableJob(co);
    const inv = await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'deposit', basisPct: 10 })).id);
    const pill = async (path: string) => /data-testid="invoice-status"[^>]*>([^<]*)</.exec((await co.owner.get(path, { accept: 'text/html' })).text)?.[1];
    expect(await pill(`/invoices/${inv.id}`)).toBe('Issued, not sent');
    expect(await pill(`/jobs/${job.id}`)).toBe('Issued, not sent');
    expect((await co.owner.post(`/api/invoices/${inv.id}/send`)).status).toBe(200);
    expect(await pill(`/invoices/${inv.id}`)).toBe('Sent, unpaid');
    expect(await pill(`/jobs/${job.id}`)).toBe('Sent, unpaid');
  });

  it('keeps the office time zone the owner chooses, refuses an unknown one, and dates the invoice history in it', async () => {
    expect((await co.owner.get('/api/settings')).body.timezone).toBe('America/Chicago');
    const bad = await co.owner.patch('/api/settings', { timezone: 'Mars/Olympus_Mons' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.timezone).toBe('Choose a time zone.');
    expect((await co.estimator.patch('/api/settings', { timezone: 'Pacific/Honolulu' })).status).toBe(403);
    try {
      // Hawaii keeps no daylight saving: HST all year, so the abbreviation is fixed.
      expect((await co.owner.patch('/api/settings', { timezone: 'Pacific/Honolulu' })).status).toBe(200);
      expect((await co.owner.get('/api/settings')).body.timezone).toBe('Pacific/Honolulu');
      const { job } = await billableJob(co);
      const d = await draft(co.owner, { jobId: job.id, kind: 'deposit', basisPct: 10 });
      const html = (await co.owner.get(`/invoices/${d.id}`, { accept: 'text/html' })).text;
      expect(html).toMatch(/\d{1,2}:\d{2}\s(AM|PM)\sHST<\/span>\s*·\s*Test Owner\s*·\s*<b>Drafted<\/b>/);
      expect(html).not.toContain(' UTC</span>');
    } finally {
      expect((await co.owner.patch('/api/settings', { timezone: 'America/Chicago' })).status).toBe(200);
    }
  });

  it('gives a PDF to staff and to the signed link, and nothing to a forged link', async () => {
    const { job } = await billableJob(co);
    const inv = await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'deposit', basisPct: 10 })).id);
    const pdf = await co.bookkeeper.get(`/api/invoices/${inv.id}/pdf`);
    expect(pdf.status).toBe(200);
    expect(pdf.headers['content-type']).toBe('application/pdf');
    expect(pdf.text.startsWith('%PDF-')).toBe(true);
    const token = inv.publicUrl.split('/pay/')[1] as string;
    const { Client } = await import('../setup/client');
    const anyone = new Client();
    expect((await anyone.get(`/api/public/invoices/${token}/pdf`)).status).toBe(200);
    expect((await anyone.get(`/pay/${token}`, { accept: 'text/html' })).text).toContain(inv.numberText);
    const [id, nonce, sig] = token.split('.');
    const forged = `${id}.${nonce}.${sig.slice(0, -2)}${sig.endsWith('AA') ? 'BB' : 'AA'}`;
    expect((await anyone.get(`/api/public/invoices/${forged}/pdf`)).status).toBe(404);
    expect((await anyone.get(`/pay/${forged}`, { accept: 'text/html' })).status).toBe(404);
    expect((await anyone.get(`/pay/${Number(id) + 1}.${nonce}.${sig}`, { accept: 'text/html' })).status).toBe(404);
    expect((await anyone.post(`/api/public/invoices/${forged}/checkout`)).status).toBe(404);
  });
});

describe('the invoice PDF', () => {
  it('prints the company, customer, job and site, lines, tax, retainage, total, paid, balance, due date, how to pay and the link', async () => {
    expect((await co.owner.patch('/api/settings', { addressLine: '1 Cedar Way', city: 'Millbrook', region: 'OR', postalCode: '97000', phone: '555-0142', email: 'office@cedar.example', licenseNumber: 'CCB 204417' })).status).toBe(200);
    const { job, customer } = await billableJob(co, 1_500_000, { commercial: true, title: 'Warehouse chain link', siteLine1: '14 Larkspur Lane', siteCity: 'Riverton', siteRegion: 'OR', sitePostal: '97101' });
    const inv = await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'progress', basisPct: 40, retainagePct: 10 })).id);
    expect(inv.retainageHeldCents).toBeGreaterThan(0);
    expect(inv.taxCents).toBeGreaterThan(0);
    const pay = await co.bookkeeper.post(`/api/invoices/${inv.id}/payments`, { amountCents: 100_000, method: 'check', receivedOn: inv.today, reference: 'Check 2207' });
    expect(pay.status, pay.text).toBe(201);
    const now = pay.body.invoice;
    const res = await fetch(`${stack().appUrl}/api/public/invoices/${inv.publicUrl.split('/pay/')[1]}/pdf`);
    expect(res.headers.get('content-type')).toBe('application/pdf');
    const pdf = await pdfText(new Uint8Array(await res.arrayBuffer()));
    const text = pdf.lines.join('\n');
    // Amounts and dates written the way an en-US reader expects, formatted here by Intl, not by the app.
    const usd = (c: number) => new Intl.NumberFormat('en-US', { style: 'currency', currency: 'USD' }).format(c / 100);
    const day = (iso: string) => new Intl.DateTimeFormat('en-US', { year: 'numeric', month: 'short', day: 'numeric', timeZone: 'UTC' }).format(new Date(`${iso}T00:00:00Z`));
    const line = (re: RegExp) => expect(pdf.lines.some((l) => re.test(l)), `${re} in:\n${text}`).toBe(true);
    const esc = (v: string) => v.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

    // Company block
    for (const v of [co.name, '1 Cedar Way', 'Millbrook, OR 97000', '555-0142 · office@cedar.example', 'Licence CCB 204417']) expect(text).toContain(v);
    // Customer, job and site
    expect(text).toContain(customer.name);
    expect(text).toContain('Testville');
    expect(text).toContain(`${job.code} · Warehouse chain link`);
    expect(text).toContain('14 Larkspur Lane, Riverton, OR 97101');
    line(new RegExp(`Invoice ${esc(inv.numberText)}`));
    // Status in the customer's words (part paid), not staff wording such as "Issued, not sent"
    line(/^Status Part paid, balance due$/);
    // Lines: quantity, unit price and amount on the description's first printed line, the
    // description (wrapped over the lines below it) whole, taxable ones marked *.
    expect(now.lines.length).toBeGreaterThan(0);
    for (const l of now.lines as { description: string; quantity: number; unitPriceCents: number; amountCents: number; taxable: boolean }[]) {
      const tail = ` ${l.quantity} ${usd(l.unitPriceCents)} ${usd(l.amountCents)}`;
      const want = `${l.description}${l.taxable ? ' *' : ''}`;
      const at = pdf.lines.findIndex((p) => p.endsWith(tail) && want.startsWith(p.slice(0, -tail.length)));
      expect(at, `${want}${tail} in:\n${text}`).toBeGreaterThanOrEqual(0);
      let got = pdf.lines[at].slice(0, -tail.length);
      for (let j = at + 1; got.length < want.length && j < pdf.lines.length; j++) got += ` ${pdf.lines[j]}`;
      expect(got).toBe(want);
    }
    // Tax, retainage, total, paid to date, balance: each label beside its amount
    line(new RegExp(`^Sales tax 8\\.25 % on ${esc(usd(now.taxableCents))} \\(materials, marked \\*\\) ${esc(usd(now.taxCents))}$`));
    line(new RegExp(`^Retainage held, 10 % \\(billed at the end\\) −${esc(usd(now.retainageHeldCents))}$`));
    line(new RegExp(`^Invoice total ${esc(usd(now.totalCents))}$`));
    line(new RegExp(`^Paid to date ${esc(usd(100_000))}$`));
    line(new RegExp(`^Balance due ${esc(usd(now.totalCents - 100_000))}$`));
    expect(now.balanceCents).toBe(now.totalCents - 100_000);
    // Due date, how to pay and the payment link (as text and as a link a viewer opens)
    line(new RegExp(`^Due ${esc(day(now.dueOn))}$`));
    expect(text).toContain('How to pay');
    expect(text).toContain(`Due ${day(now.dueOn)}. Please quote ${now.numberText} with your payment.`);
    expect(text).toContain('Online by card: open the link below and choose Pay online.');
    expect(text).toContain(`By check payable to ${co.name}, mailed to 1 Cedar Way, Millbrook, OR 97000.`);
    expect(pdf.links).toContain(now.publicUrl);
    expect(text.replace(/\s+/g, '')).toContain(now.publicUrl);
  });
});

describe('change orders and billing settings', () => {
  it('are drafted by owner and bookkeeper only, decided once, and stay in their company', async () => {
    const { job } = await billableJob(co);
    const body = { jobId: job.id, description: 'Swap to black hardware', priceCents: 12_000, costs: { material: 6_000 } };
    expect((await co.estimator.post('/api/change-orders', body)).status).toBe(403);
    expect((await other.owner.post('/api/change-orders', body)).status).toBe(400);
    const c = (await co.owner.post('/api/change-orders', body)).body;
    const second = (await co.owner.post('/api/change-orders', { ...body, description: 'Add a kick board' })).body;
    expect(second.label).toBe('CO-2');
    expect((await other.owner.post(`/api/change-orders/${c.id}/decision`, { decision: 'approved', decidedOn: '2026-03-02', approvedByName: 'X' })).status).toBe(404);
    expect((await co.owner.post(`/api/change-orders/${c.id}/decision`, { decision: 'approved', decidedOn: '2026-03-02' })).status).toBe(400);
    expect((await co.owner.post(`/api/change-orders/${c.id}/decision`, { decision: 'declined', decidedOn: '2026-03-02' })).status).toBe(200);
    expect((await co.owner.post(`/api/change-orders/${c.id}/decision`, { decision: 'approved', decidedOn: '2026-03-02', approvedByName: 'X' })).status).toBe(409);
    const r = await co.owner.post('/api/invoices', { jobId: job.id, kind: 'extra', terms: 'net_15', changeOrderIds: [c.id] });
    expect(r.status).toBe(422);
    expect(await testDb()('job_estimates').where({ source: 'change_order', source_id: c.id }).first()).toBeUndefined();
    expect((await co.owner.get(`/api/change-orders?jobId=${job.id}`)).body.map((x: { status: string }) => x.status)).toEqual(['declined', 'proposed']);
  });

  it('refuses a bad reminder schedule and lets only the owner change billing settings', async () => {
    const bad = await settings(co, { reminderOffsets: '-3, soon, 14' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.reminderOffsets).toBeTruthy();
    expect((await settings(co, { invoicePrefix: 'inv-1' })).status).toBe(400);
    expect((await co.bookkeeper.request('PUT', '/api/reminders/settings', { json: {} })).status).toBe(403);
    const ok = await settings(co, { reminderOffsets: '14, -3, 0, 7, 7' });
    expect(ok.status).toBe(200);
    expect(ok.body.reminderOffsets).toBe('-3,0,7,14');
  });
});
