import type { Actor } from '../http.ts';
import { notFound } from '../../lib/errors.ts';
import { depositCap } from '../../lib/billing/contract.ts';
import { termsFromDays } from '../../lib/billing/terms.ts';
import { jobContract, listChangeOrders } from '../repos/change-orders.ts';
import { jobBilled } from '../repos/invoices.ts';
import { billingSettings } from '../repos/billing-settings.ts';
import { db } from '../db.ts';

/** What the draft form needs about one job: its contract, what is billed, change orders open to bill. */
export async function draftFormFor(actor: Actor, jobId: number, invoiceId: number | null = null) {
  const j = await db()('jobs as j').join('customers as c', 'c.id', 'j.customer_id').where({ 'j.organization_id': actor.companyId, 'j.id': jobId }).first('j.id', 'j.code', 'j.title', 'j.commercial', 'c.name as customer_name');
  if (!j) throw notFound('That job');
  const [contract, billed, cos, s] = await Promise.all([jobContract(actor.companyId, jobId), jobBilled(actor.companyId, jobId, invoiceId), listChangeOrders(actor.companyId, jobId), billingSettings(actor.companyId)]);
  const t = termsFromDays(s.paymentTermsDays);
  return {
    job: { id: Number(j.id), code: j.code, title: j.title, customerName: j.customer_name, commercial: Boolean(j.commercial), contractCents: contract!.contractCents, billedCents: billed.billedBeforeCents },
    changeOrders: cos.filter((c) => c.status === 'approved' && (c.billedOnInvoiceId === null || c.billedOnInvoiceId === invoiceId)).map((c) => ({ id: c.id, label: c.label, description: c.description, priceCents: c.priceCents })),
    settings: { defaultRetainagePct: s.defaultRetainagePct, terms: t.terms, termsDays: t.days, depositCapCents: depositCap(contract!.contractCents, { pct: s.depositCapPct, cents: s.depositCapCents }) },
    currency: s.currency,
  };
}

/** Jobs that can be billed: won or later, newest first. */
export async function billableJobs(actor: Actor) {
  const rows = await db()('jobs as j').join('customers as c', 'c.id', 'j.customer_id').where('j.organization_id', actor.companyId).whereIn('j.status', ['won', 'building', 'completed', 'closed']).orderBy('j.id', 'desc').select('j.id', 'j.code', 'j.title', 'c.name as customer_name');
  return rows.map((r) => ({ id: Number(r.id), label: `${r.code} · ${r.title} · ${r.customer_name}` }));
}
