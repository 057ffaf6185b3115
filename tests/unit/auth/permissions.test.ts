import { describe, expect, it } from 'vitest';
import { ACTIONS, PERMISSIONS, ROLES, accessStatements, can, isRole, rolePermissions } from '../../../src/lib/auth/permissions';
import { NAV, navFor } from '../../../src/lib/nav';

describe('the role × action table', () => {
  it('names only known roles, and every action has at least one role and a sentence', () => {
    for (const a of ACTIONS) {
      expect(PERMISSIONS[a].roles.length, a).toBeGreaterThan(0);
      for (const r of PERMISSIONS[a].roles) expect(isRole(r), `${a}: ${r}`).toBe(true);
      expect(PERMISSIONS[a].what.length, a).toBeGreaterThan(5);
    }
  });

  it('gives the owner every action', () => {
    for (const a of ACTIONS) expect(can('owner', a), a).toBe(true);
  });

  it.each([
    ['crew_lead', 'jobs:read', true],
    ['crew_lead', 'time:log', true],
    ['crew_lead', 'jobs:write', false],
    ['crew_lead', 'customers:read', false],
    ['crew_lead', 'workers:read', false],
    ['crew_lead', 'pricebook:read', false],
    ['crew_lead', 'reports:read', false],
    ['crew_lead', 'bids:read', false],
    ['bookkeeper', 'receipts:write', true],
    ['bookkeeper', 'invoices:draft', true],
    ['bookkeeper', 'invoices:send', false],
    ['bookkeeper', 'bids:write', false],
    ['bookkeeper', 'bids:read', true],
    ['estimator', 'bids:write', true],
    ['estimator', 'pricebook:write', true],
    ['estimator', 'invoices:read', false],
    ['estimator', 'members:manage', false],
  ] as const)('%s may %s: %s', (role, action, allowed) => {
    expect(can(role, action)).toBe(allowed);
  });

  it('refuses a missing role', () => {
    expect(can(null, 'jobs:read')).toBe(false);
    expect(can(undefined, 'dashboard:read')).toBe(false);
  });

  it('becomes better-auth statements with the same content', () => {
    const statements = accessStatements();
    const flat = Object.entries(statements).flatMap(([res, verbs]) => verbs.map((v) => `${res}:${v}`)).sort();
    expect(flat).toEqual([...ACTIONS].sort());
    for (const role of ROLES) {
      const granted = Object.entries(rolePermissions(role)).flatMap(([res, verbs]) => verbs.map((v) => `${res}:${v}`)).sort();
      expect(granted).toEqual(ACTIONS.filter((a) => can(role, a)).sort());
    }
  });

  it('shows each role only the screens it may use', () => {
    expect(navFor('crew_lead').map((i) => i.href)).not.toContain('/customers');
    expect(navFor('owner').length).toBe(NAV.length);
    for (const role of ROLES) for (const item of navFor(role)) expect(can(role, item.action)).toBe(true);
  });
});

describe('the current screen in the side bar', () => {
  it('is the longest matching entry', async () => {
    const { currentHref, NAV } = await import('../../../src/lib/nav');
    expect(currentHref(NAV, '/settings/members')).toBe('/settings/members');
    expect(currentHref(NAV, '/settings')).toBe('/settings');
    expect(currentHref(NAV, '/jobs/12/bids/3')).toBe('/jobs');
    expect(currentHref(NAV, '/')).toBe('/');
    expect(currentHref(NAV, '/nowhere')).toBeNull();
  });
});
