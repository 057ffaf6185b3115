/**
 * The one role × action table. Endpoint guards, better-auth's access control, the
 * navigation, the permissions page in settings and the permission tests all read it.
 */
export const ROLES = ['owner', 'bookkeeper', 'estimator', 'crew_lead'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  owner: 'Owner',
  bookkeeper: 'Bookkeeper',
  estimator: 'Estimator',
  crew_lead: 'Crew lead',
};

const O = 'owner', B = 'bookkeeper', E = 'estimator', C = 'crew_lead';

/** action → roles allowed, with a sentence the permissions page shows. */
export const PERMISSIONS = {
  'dashboard:read': { roles: [O, B, E, C], what: 'See the dashboard' },
  'jobs:read': { roles: [O, B, E, C], what: 'See jobs (a crew lead sees only the jobs assigned to them)' },
  'jobs:write': { roles: [O, E], what: 'Create and edit jobs' },
  'jobs:delete': { roles: [O], what: 'Delete a job' },
  'customers:read': { roles: [O, B, E], what: 'See customers' },
  'customers:write': { roles: [O, B, E], what: 'Create and edit customers' },
  'styles:read': { roles: [O, B, E], what: 'See fence styles and labour rates' },
  'styles:write': { roles: [O, E], what: 'Edit fence styles and labour rates' },
  'pricebook:read': { roles: [O, B, E], what: 'See the price book and its unit costs' },
  'pricebook:write': { roles: [O, E], what: 'Edit and import the price book' },
  'bids:read': { roles: [O, B, E], what: 'See bids and takeoffs' },
  'bids:write': { roles: [O, E], what: 'Build, save and accept bids' },
  'checklist:write': { roles: [O, E], what: 'Record locate tickets, permits and the pre-dig checklist' },
  'checklist:override': { roles: [O], what: 'Let a job go to building without an unexpired locate ticket, with a written reason' },
  'receipts:read': { roles: [O, B], what: 'See supplier receipt imports' },
  'receipts:write': { roles: [O, B], what: 'Import supplier receipts and allocate lines to jobs' },
  'costs:read': { roles: [O, B, E], what: 'See actual costs and job cost against bid' },
  'costs:write': { roles: [O, B], what: 'Enter other costs by hand and fix allocations' },
  'time:log': { roles: [O, B, C], what: 'Log crew hours and rentals (a crew lead on assigned jobs only)' },
  'time:read_all': { roles: [O, B], what: 'See every time entry and rental with its cost' },
  'workers:read': { roles: [O, B], what: 'See workers and their wages' },
  'workers:write': { roles: [O, B], what: 'Add workers and set wages' },
  'invoices:read': { roles: [O, B], what: 'See invoices and change orders' },
  'invoices:draft': { roles: [O, B], what: 'Draft invoices and change orders' },
  'invoices:send': { roles: [O], what: 'Issue, send and void invoices' },
  'payments:write': { roles: [O, B], what: 'Record payments' },
  'payments:refund': { roles: [O], what: 'Refund a payment' },
  'receivables:read': { roles: [O, B], what: 'See receivables and aging' },
  'reminders:write': { roles: [O], what: 'Set the reminder schedule' },
  'reports:read': { roles: [O, B, E], what: 'See margins and profitability reports' },
  'wip:read': { roles: [O, B], what: 'See the work-in-progress billing position' },
  'calibration:read': { roles: [O, E], what: 'See calibration suggestions and backtests' },
  'calibration:apply': { roles: [O, E], what: 'Apply calibrated rates' },
  'members:read': { roles: [O], what: 'See the company\'s members' },
  'members:manage': { roles: [O], what: 'Invite members, change roles, remove members' },
  'settings:read': { roles: [O, B, E, C], what: 'See company settings and this permissions table' },
  'settings:write': { roles: [O], what: 'Change company settings' },
} as const satisfies Record<string, { roles: readonly Role[]; what: string }>;

export type Action = keyof typeof PERMISSIONS;
export const ACTIONS = Object.keys(PERMISSIONS) as Action[];

export function can(role: Role | null | undefined, action: Action): boolean {
  if (!role) return false;
  return (PERMISSIONS[action].roles as readonly Role[]).includes(role);
}

export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (ROLES as readonly string[]).includes(value);
}

/**
 * The same table as better-auth access-control statements: resource → verbs, and per
 * role the verbs it holds. 'jobs:read' becomes { jobs: ['read'] }.
 */
export function accessStatements(): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const action of ACTIONS) {
    const [resource, verb] = action.split(':');
    (out[resource] ??= []).push(verb);
  }
  return out;
}

export function rolePermissions(role: Role): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const action of ACTIONS) {
    if (!can(role, action)) continue;
    const [resource, verb] = action.split(':');
    (out[resource] ??= []).push(verb);
  }
  return out;
}
