import { describe, expect, it } from 'vitest';
import { formatJobCode, jobInput, jobListQuery } from '../../src/lib/jobs/schema';
import { customerInput } from '../../src/lib/customers/schema';
import { fieldErrors } from '../../src/lib/errors';

describe('job input', () => {
  it('accepts a minimal job and fills defaults', () => {
    const r = jobInput.parse({ title: 'Back yard', customerId: '4' });
    expect(r).toMatchObject({ title: 'Back yard', customerId: 4, status: 'lead', code: null, fenceStyleId: null, commercial: false });
  });

  it.each([
    [{ title: '', customerId: 1 }, 'title'],
    [{ title: 'x', customerId: '' }, 'customerId'],
    [{ title: 'x', customerId: -3 }, 'customerId'],
    [{ title: 'x', customerId: 1, code: 'job 12' }, 'code'],
    [{ title: 'x', customerId: 1, status: 'done' }, 'status'],
    [{ title: 'x', customerId: 1, leadDate: '2026-02-30x' }, 'leadDate'],
    [{ title: 'x'.repeat(201), customerId: 1 }, 'title'],
    [{ title: 'x', customerId: 1, surprise: true }, '_'],
  ])('refuses %j with an error on %s', (input, field) => {
    const r = jobInput.safeParse(input);
    expect(r.success).toBe(false);
    if (!r.success) expect(Object.keys(fieldErrors(r.error.issues))).toContain(field);
  });

  it('upper-cases a typed code', () => {
    expect(jobInput.parse({ title: 'x', customerId: 1, code: 'j-0142' }).code).toBe('J-0142');
  });

  it('formats counters as job codes', () => {
    expect(formatJobCode(7)).toBe('J-0007');
    expect(formatJobCode(142)).toBe('J-0142');
    expect(formatJobCode(12345)).toBe('J-12345');
  });

  it('parses list filters from a query string', () => {
    expect(jobListQuery.parse({ status: 'won,lost', style: '3', page: '2' })).toMatchObject({ status: ['won', 'lost'], style: [3], page: 2, pageSize: 25, sort: 'code' });
    expect(jobListQuery.safeParse({ status: 'bogus' }).success).toBe(false);
    expect(jobListQuery.safeParse({ pageSize: '5000' }).success).toBe(false);
  });
});

describe('customer input', () => {
  it('normalises e-mail and empty fields', () => {
    expect(customerInput.parse({ name: ' Ada ', email: 'ADA@Example.com', phone: '' })).toMatchObject({ name: 'Ada', email: 'ada@example.com', phone: null });
  });
  it('refuses a bad e-mail and phone', () => {
    const r = customerInput.safeParse({ name: 'Ada', email: 'not-an-email', phone: 'call me' });
    expect(r.success).toBe(false);
    if (!r.success) expect(Object.keys(fieldErrors(r.error.issues)).sort()).toEqual(['email', 'phone']);
  });
});

describe('schemas the browser and the endpoint share', () => {
  it('parse their own output to the same value', () => {
    const job = jobInput.parse({ title: 'Back yard', customerId: '4', code: '', siteCity: '', leadDate: '2026-05-01' });
    expect(jobInput.parse(job)).toEqual(job);
    const customer = customerInput.parse({ name: 'Ada', email: '', phone: '555-0100' });
    expect(customerInput.parse(customer)).toEqual(customer);
  });
});
