import type { Knex } from 'knex';
import { rng } from '../../lib/random.ts';
import { addDays } from '../../lib/billing/terms.ts';
import { DEMO, DEMO_USERS } from './demo.ts';
import type { Actor } from '../http.ts';
import { createDraftTx, issueTx, sendTx } from '../services/invoices.ts';
import { landPaymentTx } from '../services/payments.ts';
import { decideChangeOrder, findChangeOrder, insertChangeOrder, writeChangeOrderEstimate } from '../repos/change-orders.ts';
import { findInvoice } from '../repos/invoices.ts';
import { audit } from '../repos/audit.ts';
import type { InvoiceDraftInput } from '../../lib/billing/schema.ts';

interface DemoJob { id: number; status: string; commercial: boolean; contract: number; decided: string | null; started: string | null; completed: string | null; customer: string }

const owner: Actor = { companyId: DEMO.orgId, userId: DEMO_USERS[0].id, role: 'owner' };
const books: Actor = { companyId: DEMO.orgId, userId: DEMO_USERS[1].id, role: 'bookkeeper' };

/**
 * The demo company's billing, through the same code the app runs (drafts, issue with a
 * past date, payments by check and by card as the webhook records them), so every number
 * on screen comes from real rows. Deterministic for a given seed date; no e-mail is queued.
 * Days past due for the open invoices are chosen so every aging bucket has some.
 */
export async function seedDemoInvoices(knex: Knex, today = new Date()): Promise<void> {
  const done = await knex('invoices').where('organization_id', DEMO.orgId).first('id');
  if (done) return;
  const r = rng(DEMO.seed + 5);
  const day = (n: number) => addDays(today.toISOString().slice(0, 10), -n);
  await knex('company_settings').where('organization_id', DEMO.orgId).update({ deposit_cap_pct: null, deposit_cap_cents: null, default_retainage_pct: 10, reminder_offsets: '-3,0,7,14,30' });

  const rows = await knex('jobs as j').join('customers as c', 'c.id', 'j.customer_id')
    .where('j.organization_id', DEMO.orgId).whereIn('j.status', ['won', 'building', 'completed', 'closed']).where('j.contract_cents', '>', 0).orderBy('j.id')
    .select('j.id', 'j.status', 'j.commercial', 'j.contract_cents', 'j.decided_date', 'j.start_date', 'j.completed_date', 'c.name');
  const jobs: DemoJob[] = rows.map((j) => ({ id: Number(j.id), status: j.status, commercial: Boolean(j.commercial), contract: Number(j.contract_cents), decided: j.decided_date, started: j.start_date, completed: j.completed_date, customer: j.name }));
  // A commercial job to show retainage: the first one the demo has, or else the first building job.
  if (!jobs.some((j) => j.commercial && j.status !== 'won')) {
    const pick = jobs.find((j) => j.status === 'building') ?? jobs.find((j) => j.status === 'completed');
    if (pick) { pick.commercial = true; await knex('jobs').where('id', pick.id).update({ commercial: true }); }
  }
  // Days past due for open bills, one of each bucket first, then a spread.
  const pastDue = [-6, 12, 44, 73, 118, 3, 27, -2, 52, 96];
  let nextOpen = 0;
  let card = 0;
  const cos = ['Add a 4 ft walk gate with self-closing hinges', 'Extend the run 24 ft along the alley', 'Swap to black-coated hardware', 'Remove and haul away the old chain link'];

  await knex.transaction(async (trx) => {
    const mk = async (actor: Actor, input: Partial<InvoiceDraftInput> & { jobId: number; kind: InvoiceDraftInput['kind'] }) =>
      createDraftTx(trx, actor, { basisPct: null, requestedCents: null, lines: [], changeOrderIds: [], terms: 'net_15', termsDays: null, notes: null, retainagePct: null, overContractOk: false, overDepositCapOk: false, overrideReason: null, ...input });
    const issueOn = async (id: number, on: string) => { await issueTx(trx, owner, id, on); await sendTx(trx, owner, id, { mail: false }); };
    const pay = async (id: number, on: string, part = 1) => {
      const inv = (await findInvoice(DEMO.orgId, id, trx))!;
      // part: a percent of the total, rounded to whole dollars
      const amount = part === 1 ? inv.totalCents - inv.paidCents : Math.round((inv.totalCents * part) / 10_000) * 100;
      if (r.chance(0.45)) {
        // The same row the webhook writes for a card payment, with its event stored once.
        card++;
        const intent = `pi_demo_${String(card).padStart(6, '0')}`;
        await landPaymentTx(trx, owner, id, { method: 'card', amountCents: amount, receivedOn: on, reference: intent, asCredit: true, stripePaymentIntent: intent, stripeCheckoutSession: `cs_demo_${String(card).padStart(6, '0')}` }, { mail: false });
        await trx('stripe_events').insert({ id: `evt_demo_${String(card).padStart(6, '0')}`, organization_id: DEMO.orgId, type: 'checkout.session.completed', invoice_id: id, outcome: 'payment recorded (demo)' });
      } else {
        await landPaymentTx(trx, books, id, { method: r.chance(0.85) ? 'check' : 'bank_transfer', amountCents: amount, receivedOn: on, reference: `Check ${r.int(1001, 9899)}`, asCredit: false }, { mail: false });
      }
    };
    const openDate = () => day(pastDue[nextOpen++ % pastDue.length] + 15);

    let wonSeen = 0;
    const building = jobs.filter((j) => j.status === 'building').map((j) => j.id);
    for (const [i, j] of jobs.entries()) {
      const won = j.decided ?? day(60);
      if (j.status === 'won') {
        wonSeen++;
        // Every third won job waits for its deposit (the owner's first job in the demo), one is a draft.
        if (wonSeen % 3 === 1) continue;
        const id = await mk(books, { jobId: j.id, kind: 'deposit', basisPct: 10 });
        if (wonSeen % 3 === 2) await issueOn(id, day(Math.min(12, r.int(2, 9))));
        continue;
      }
      const dep = await mk(owner, { jobId: j.id, kind: 'deposit', basisPct: r.pick([10, 25, 30]) });
      if (j.id === building[building.length - 1]) {
        // The newest building job still owes its deposit, and its first progress bill is a draft.
        await issueOn(dep, openDate());
        await mk(books, { jobId: j.id, kind: 'progress', basisPct: 40, notes: 'Posts set and rails hung on the north run.' });
        continue;
      }
      await issueOn(dep, won);
      await pay(dep, addDays(won, r.int(1, 6)));

      let coId: number | null = null;
      if (i % 4 === 1) {
        coId = await insertChangeOrder(DEMO.orgId, { jobId: j.id, description: cos[i % cos.length], priceCents: r.int(4, 18) * 5000, costs: { material: r.int(2, 8) * 2500, labour: r.int(1, 5) * 2500 }, createdBy: owner.userId }, trx);
        await decideChangeOrder(DEMO.orgId, coId, { status: 'approved', decidedOn: addDays(won, 9), approvedByName: j.customer }, trx);
        await writeChangeOrderEstimate(DEMO.orgId, (await findChangeOrder(DEMO.orgId, coId, trx))!, trx);
      }
      if (j.id === building[0]) {
        // One change order still waiting for the customer's answer.
        await insertChangeOrder(DEMO.orgId, { jobId: j.id, description: 'Raise the gate section to 6 ft', priceCents: 42_000, costs: { material: 18_000, labour: 9_000 }, createdBy: owner.userId }, trx);
      }

      if (j.status === 'building') {
        const pct = r.pick([40, 50, 60]);
        const prog = await mk(owner, { jobId: j.id, kind: 'progress', basisPct: pct, changeOrderIds: coId ? [coId] : [] });
        await issueOn(prog, openDate());
        if (r.chance(0.3)) await pay(prog, day(r.int(1, 4)), 40);
        if (j.id === building[0]) await mk(books, { jobId: j.id, kind: 'progress', basisPct: pct + 20 });
        continue;
      }
      const prog = await mk(owner, { jobId: j.id, kind: 'progress', basisPct: 60, changeOrderIds: coId ? [coId] : [] });
      const progOn = addDays(j.started ?? won, 10);
      await issueOn(prog, progOn);
      await pay(prog, addDays(progOn, r.int(3, 14)));
      if (i % 9 === 4) {
        // Issued with the wrong percent and replaced: the void stays on file with its reason.
        const wrong = await mk(owner, { jobId: j.id, kind: 'final', notes: 'Final bill' });
        await issueTx(trx, owner, wrong, j.completed ?? day(30));
        const reason = 'Sent before the last gate was hung; replaced';
        await trx('invoices').where({ organization_id: DEMO.orgId, id: wrong }).update({ status: 'void', void_reason: reason, voided_at: trx.fn.now(3) });
        await audit(trx, owner, 'invoice', wrong, 'void', { reason });
      }
      const fin = await mk(owner, { jobId: j.id, kind: 'final' });
      if (j.status === 'closed') {
        const finOn = j.completed ?? day(90);
        await issueOn(fin, finOn);
        await pay(fin, addDays(finOn, r.int(4, 20)));
      } else {
        await issueOn(fin, openDate());
        if (r.chance(0.25)) await pay(fin, day(2), 30);
      }
    }
    // Reminders the schedule called for before today count as sent, so the first worker pass
    // after seeding mails nobody about last month.
    const open = await trx('invoices').where('organization_id', DEMO.orgId).whereIn('status', ['issued', 'partly_paid']).select('id', 'issued_on', 'due_on');
    const offsets = [-3, 0, 7, 14, 30];
    const todayIso = day(0);
    const sent = open.flatMap((inv) => offsets.map((o) => ({ o, on: addDays(inv.due_on, o), inv })).filter((x) => x.on <= todayIso && x.on > x.inv.issued_on).map((x) => ({ organization_id: DEMO.orgId, invoice_id: x.inv.id, offset_days: x.o, sent_on: x.on })));
    if (sent.length) await trx('invoice_reminders').insert(sent);
  });
}
