import { can, type Action, type Role } from './auth/permissions.ts';

export interface NavItem {
  href: string;
  label: string;
  action: Action;
  /** Grouping in the side bar. */
  group: 'work' | 'money' | 'insight' | 'company';
}

/** Every screen in the side bar with the permission that shows it; features add theirs. */
export const NAV: NavItem[] = [
  { href: '/', label: 'Dashboard', action: 'dashboard:read', group: 'work' },
  { href: '/jobs', label: 'Jobs', action: 'jobs:read', group: 'work' },
  { href: '/customers', label: 'Customers', action: 'customers:read', group: 'work' },
  { href: '/time', label: 'Crew time', action: 'time:log', group: 'work' },
  { href: '/receipts', label: 'Receipts', action: 'receipts:read', group: 'money' },
  { href: '/costs', label: 'Costs', action: 'costs:read', group: 'money' },
  { href: '/settings', label: 'Company settings', action: 'settings:write', group: 'company' },
  { href: '/settings/members', label: 'Members', action: 'members:read', group: 'company' },
  { href: '/workers', label: 'Workers', action: 'workers:read', group: 'company' },
  { href: '/settings/permissions', label: 'Permissions', action: 'settings:read', group: 'company' },
];

export const NAV_GROUPS: Record<NavItem['group'], string> = {
  work: 'Work',
  money: 'Money',
  insight: 'Margins',
  company: 'Company',
};

export function navFor(role: Role | null): NavItem[] {
  return NAV.filter((item) => can(role, item.action));
}

/** True when href is the current page or a section it belongs to. */
export function isCurrent(href: string, path: string): boolean {
  if (href === '/') return path === '/';
  return path === href || path.startsWith(`${href}/`);
}
