import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { describeOffset, reminderToSend } from '../../lib/reminders/index.ts';
import type { BillingSettingsInput } from '../../lib/billing/schema.ts';
import { openInvoices, findInvoice } from '../repos/invoices.ts';
import { billingSettings, companiesWithReminders, todayIn, updateBillingSettings } from '../repos/billing-settings.ts';
import { audit } from '../repos/audit.ts';
import { enqueueMail } from '../mail/outbox.ts';
import { reminderMail } from './billing-mail.ts';
import { invoiceUrl } from './invoice-links.ts';

export const getBillingSettings = (actor: Actor) => billingSettings(actor.companyId);

export async function saveBillingSettings(actor: Actor, input: BillingSettingsInput) {
  await db().transaction(async (trx) => {
    await updateBillingSettings(actor.companyId, input, trx);
    await audit(trx, actor, 'settings', actor.companyId, 'billing', input);
  });
  return billingSettings(actor.companyId);
}

/**
 * One pass of the reminder job: for each open invoice, the reminder its schedule calls for
 * today (at most one), written to the outbox with the reminder row in one transaction. The
 * row's unique (invoice, offset) and the outbox dedupe key make it once, however many workers.
 */
export async function sendDueReminders(now = new Date()): Promise<number> {
  let sent = 0;
  for (const c of await companiesWithReminders()) {
    const today = todayIn(c.timezone, now);
    const open = await openInvoices(c.companyId);
    if (!open.length) continue;
    const rows = await db()('invoice_reminders').where('organization_id', c.companyId).whereIn('invoice_id', open.map((i) => i.id)).select('invoice_id', 'offset_days');
    for (const inv of open) {
      if (!inv.dueOn || !inv.issuedOn || !inv.customerEmail) continue;
      const offset = reminderToSend({ offsets: c.schedule, issuedOn: inv.issuedOn, dueOn: inv.dueOn, today, sent: rows.filter((r) => Number(r.invoice_id) === inv.id).map((r) => Number(r.offset_days)) });
      if (offset === null) continue;
      const did = await db().transaction(async (trx) => {
        const fresh = await findInvoice(c.companyId, inv.id, trx, true);
        if (!fresh || (fresh.status !== 'issued' && fresh.status !== 'partly_paid') || fresh.balanceCents <= 0) return false;
        const ins = await trx('invoice_reminders').insert({ organization_id: c.companyId, invoice_id: inv.id, offset_days: offset, sent_on: today }).onConflict(['invoice_id', 'offset_days']).ignore();
        if (!(Array.isArray(ins) && Number(ins[0]) > 0)) return false;
        const s = await billingSettings(c.companyId, trx);
        const when = offset < 0 ? `due in ${-offset} day${offset === -1 ? '' : 's'}` : offset === 0 ? 'due today' : `${offset} day${offset === 1 ? '' : 's'} past due`;
        await enqueueMail(trx, {
          organizationId: c.companyId,
          ...reminderMail({ to: inv.customerEmail!, company: s.companyName, customerName: inv.customerName, numberText: inv.numberText ?? '', jobTitle: inv.jobTitle, totalCents: fresh.totalCents, balanceCents: fresh.balanceCents, dueOn: fresh.dueOn, url: invoiceUrl(fresh.id, fresh.publicNonce), currency: s.currency, when }),
          dedupeKey: `reminder:invoice:${inv.id}:${offset}`,
        });
        await audit(trx, { companyId: c.companyId, userId: '', role: 'owner' }, 'invoice', inv.id, 'reminder', { offset, schedule: describeOffset(offset) });
        return true;
      });
      if (did) sent++;
    }
  }
  return sent;
}
