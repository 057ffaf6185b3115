import type { Actor } from '../http.ts';
import { customerOptions } from '../repos/customers.ts';
import { listStyles } from '../repos/styles.ts';
import { membersInRoles } from '../repos/members.ts';

/** The choices a job form offers: this company's customers, styles and people. */
export async function jobFormOptions(actor: Actor) {
  const [customers, styles, estimators, crewLeads] = await Promise.all([
    customerOptions(actor.companyId),
    listStyles(actor.companyId),
    membersInRoles(actor.companyId, ['estimator', 'owner']),
    membersInRoles(actor.companyId, ['crew_lead', 'owner']),
  ]);
  return {
    customers,
    styles: styles.filter((s) => s.active).map((s) => ({ id: s.id, name: s.name })),
    estimators: estimators.map((m) => ({ id: m.userId, name: m.name })),
    crewLeads: crewLeads.map((m) => ({ id: m.userId, name: m.name })),
  };
}
