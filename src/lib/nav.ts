import { can, type Action, type Role } from './auth/permissions.ts';

export interface NavItem {
  href: string;
  label: string;
  action: Action;
  /** Grouping in the side bar. */
  group: 'work' | 'estimating' | 'money' | 'insight' | 'company';
}

/** Every screen in the side bar with the permission that shows it; features add theirs. */
export const NAV: NavItem[] = [
  { href: '/', label: 'Dashboard', action: 'dashboard:read', group: 'work' },
  { href: '/jobs', label: 'Jobs', action: 'jobs:read', group: 'work' },
  { href: '/customers', label: 'Customers', action: 'customers:read', group: 'work' },
  { href: '/time', label: 'Crew time', action: 'time:log', group: 'work' },
  { href: '/pricebook', label: 'Price book', action: 'pricebook:read', group: 'estimating' },
  { href: '/styles', label: 'Fence styles', action: 'styles:read', group: 'estimating' },
  { href: '/rates', label: 'Labour rates', action: 'styles:read', group: 'estimating' },
  { href: '/receipts', label: 'Receipts', action: 'receipts:read', group: 'money' },
  { href: '/costs', label: 'Costs', action: 'costs:read', group: 'money' },
  { href: '/invoices', label: 'Invoices', action: 'invoices:read', group: 'money' },
  { href: '/receivables', label: 'Receivables', action: 'receivables:read', group: 'money' },
  { href: '/margins', label: 'Margins by style', action: 'reports:read', group: 'insight' },
  { href: '/wip', label: 'Work in progress', action: 'wip:read', group: 'insight' },
  { href: '/calibration', label: 'Calibration', action: 'calibration:read', group: 'insight' },
  { href: '/settings', label: 'Company settings', action: 'settings:write', group: 'company' },
  { href: '/settings/members', label: 'Members', action: 'members:read', group: 'company' },
  { href: '/workers', label: 'Workers', action: 'workers:read', group: 'company' },
  { href: '/settings/reminders', label: 'Reminders and billing', action: 'reminders:write', group: 'company' },
  { href: '/settings/permissions', label: 'Permissions', action: 'settings:read', group: 'company' },
];

export const NAV_GROUPS: Record<NavItem['group'], string> = {
  work: 'Work',
  estimating: 'Estimating',
  money: 'Money',
  insight: 'Margins',
  company: 'Company',
};

export function navFor(role: Role | null): NavItem[] {
  return NAV.filter((item) => can(role, item.action));
}

/** The one item the current page belongs to: the longest href that is the path or a parent of it. */
export function currentHref(items: readonly NavItem[], path: string): string | null {
  let best: string | null = null;
  for (const { href } of items) {
    const match = href === '/' ? path === '/' : path === href || path.startsWith(`${href}/`);
    if (match && (!best || href.length > best.length)) best = href;
  }
  return best;
}
