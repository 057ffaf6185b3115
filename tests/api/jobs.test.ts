import { beforeAll, describe, expect, it } from 'vitest';
import { makeCompany, makeCustomer, makeJob, type TestCompany } from '../setup/factory';

let co: TestCompany;
let other: TestCompany;
let customerId: number;

beforeAll(async () => {
  [co, other] = await Promise.all([makeCompany(), makeCompany()]);
  customerId = (await makeCustomer(co.owner)).id;
});

describe('jobs and customers by role', () => {
  it.each([
    ['owner', 201],
    ['estimator', 201],
    ['bookkeeper', 403],
    ['crew_lead', 403],
  ] as const)('%s creating a job gets %i', async (role, status) => {
    const r = await co.as(role).post('/api/jobs', { title: `By ${role}`, customerId });
    expect(r.status).toBe(status);
    if (status === 201) expect(r.body.code).toMatch(/^J-\d{4}$/);
  });

  it.each([
    ['owner', 201],
    ['estimator', 201],
    ['bookkeeper', 201],
    ['crew_lead', 403],
  ] as const)('%s creating a customer gets %i', async (role, status) => {
    expect((await co.as(role).post('/api/customers', { name: `Made by ${role}` })).status).toBe(status);
  });

  it.each(['owner', 'estimator', 'bookkeeper'] as const)('%s reads customers', async (role) => {
    expect((await co.as(role).get('/api/customers')).status).toBe(200);
  });

  it('a crew lead reads no customers, and gets 403 before the body is looked at', async () => {
    expect((await co.crew_lead.get('/api/customers')).status).toBe(403);
    const garbage = await co.crew_lead.request('POST', '/api/jobs', { body: '{not json', headers: { 'content-type': 'application/json' } });
    expect(garbage.status).toBe(403);
    expect((await co.crew_lead.request('PATCH', '/api/customers/1', { body: 'x', headers: { 'content-type': 'text/plain' } })).status).toBe(403);
  });

  it('a crew lead sees only the jobs assigned to them, without prices', async () => {
    const mine = await makeJob(co.owner, customerId, { crewLeadUserId: co.userIds.crew_lead, status: 'building' });
    const notMine = await makeJob(co.owner, customerId, { status: 'building' });
    const list = await co.crew_lead.get('/api/jobs?pageSize=200');
    expect(list.status).toBe(200);
    const ids = list.body.items.map((j: { id: number }) => j.id);
    expect(ids).toContain(mine.id);
    expect(ids).not.toContain(notMine.id);
    expect(list.body.items.every((j: { contractCents: unknown }) => j.contractCents === null)).toBe(true);
    expect((await co.crew_lead.get(`/api/jobs/${notMine.id}`)).status).toBe(404);
    expect((await co.crew_lead.get(`/api/jobs/${mine.id}`)).status).toBe(200);
  });
});

describe('tenancy', () => {
  it("another company's job and customer are 404, for reading and writing", async () => {
    const job = await makeJob(co.owner, customerId);
    for (const [path, body] of [[`/api/jobs/${job.id}`, { title: 'Stolen' }], [`/api/customers/${customerId}`, { name: 'Stolen' }]] as const) {
      expect((await other.owner.get(path)).status, path).toBe(404);
      expect((await other.owner.patch(path, body)).status, path).toBe(404);
    }
    expect((await co.owner.get(`/api/jobs/${job.id}`)).body.title).toBe('Test fence');
  });

  it("refuses a job pointing at another company's customer", async () => {
    const foreign = await makeCustomer(other.owner);
    const r = await co.owner.post('/api/jobs', { title: 'Sneaky', customerId: foreign.id });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.customerId).toBeTruthy();
  });

  it('answers 404 for ids that are not ids', async () => {
    for (const id of ['abc', '0', '-1', '1.5', '99999999999999999999']) {
      expect((await co.owner.get(`/api/jobs/${id}`)).status, id).toBe(404);
    }
  });
});

describe('bad input', () => {
  it('answers 400 with field errors', async () => {
    const r = await co.owner.post('/api/jobs', { title: '', customerId: 'x', status: 'finished', leadDate: 'yesterday' });
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe('BAD_INPUT');
    expect(Object.keys(r.body.error.fields).sort()).toEqual(['customerId', 'leadDate', 'status', 'title']);
  });

  it('refuses unknown fields', async () => {
    const r = await co.owner.post('/api/jobs', { title: 'x', customerId, organizationId: other.id });
    expect(r.status).toBe(400);
  });

  it('answers 409 for a duplicate job code in the same company, but not across companies', async () => {
    const code = `J-${Math.floor(Math.random() * 900000) + 100000}`;
    expect((await co.owner.post('/api/jobs', { title: 'First', customerId, code })).status).toBe(201);
    const dup = await co.owner.post('/api/jobs', { title: 'Second', customerId, code });
    expect(dup.status).toBe(409);
    expect(dup.body.error.code).toBe('DUPLICATE_JOB_CODE');
    expect(dup.body.error.fields.code).toBeTruthy();
    const otherCustomer = await makeCustomer(other.owner);
    expect((await other.owner.post('/api/jobs', { title: 'Elsewhere', customerId: otherCustomer.id, code })).status).toBe(201);
  });

  it('answers 415 for a non-JSON body, 400 for broken JSON and 413 for an oversized one', async () => {
    expect((await co.owner.request('POST', '/api/customers', { body: 'name=x', headers: { 'content-type': 'application/x-www-form-urlencoded' } })).status).toBe(415);
    expect((await co.owner.request('POST', '/api/customers', { body: '{"name":', headers: { 'content-type': 'application/json' } })).status).toBe(400);
    const big = JSON.stringify({ name: 'x', notes: 'y'.repeat(2_000_000) });
    expect((await co.owner.request('POST', '/api/customers', { body: big, headers: { 'content-type': 'application/json' } })).status).toBe(413);
  });

  it('gives concurrent creates distinct job codes', async () => {
    const made = await Promise.all(Array.from({ length: 8 }, (_, i) => co.owner.post('/api/jobs', { title: `Race ${i}`, customerId })));
    expect(made.every((r) => r.status === 201)).toBe(true);
    const codes = made.map((r) => r.body.code);
    expect(new Set(codes).size).toBe(8);
  });
});

describe('the jobs table endpoint', () => {
  it('pages, sorts, filters and searches on the server', async () => {
    const c = await makeCompany();
    const cust = await makeCustomer(c.owner, 'Zebulon Quarry');
    for (const [i, status] of (['lead', 'won', 'won', 'lost', 'building'] as const).entries()) {
      await makeJob(c.owner, cust.id, { title: `Run ${i}`, status, code: `J-${String(i + 1).padStart(4, '0')}` });
    }
    const page1 = await c.owner.get('/api/jobs?pageSize=2&page=1&sort=code&dir=asc');
    expect(page1.body.total).toBe(5);
    expect(page1.body.items.map((j: { code: string }) => j.code)).toEqual(['J-0001', 'J-0002']);
    const page3 = await c.owner.get('/api/jobs?pageSize=2&page=3&sort=code&dir=asc');
    expect(page3.body.items.map((j: { code: string }) => j.code)).toEqual(['J-0005']);
    const won = await c.owner.get('/api/jobs?status=won');
    expect(won.body.total).toBe(2);
    const search = await c.owner.get('/api/jobs?q=zebul');
    expect(search.body.total).toBe(5);
    const none = await c.owner.get('/api/jobs?q=%25');
    expect(none.body.total).toBe(0);
    expect((await c.owner.get('/api/jobs?sort=password')).status).toBe(400);
  });
});

describe('partial updates', () => {
  it('change only the fields sent: a renamed job keeps its status and kind, a worker given a new wage stays inactive', async () => {
    const job = await makeJob(co.owner, customerId, { status: 'completed', commercial: true });
    const r = await co.owner.patch(`/api/jobs/${job.id}`, { title: 'Back yard, renamed' });
    expect(r.status).toBe(200);
    const after = (await co.owner.get(`/api/jobs/${job.id}`)).body;
    expect(after).toMatchObject({ title: 'Back yard, renamed', status: 'completed', commercial: true });

    const worker = (await co.owner.post('/api/workers', { name: 'Pell Ardent', wageCents: 2400 })).body;
    expect((await co.owner.patch(`/api/workers/${worker.id}`, { active: false })).status).toBe(200);
    expect((await co.owner.patch(`/api/workers/${worker.id}`, { wageCents: 2600 })).status).toBe(200);
    const list = (await co.owner.get('/api/workers')).body;
    const items = Array.isArray(list) ? list : list.items;
    expect(items.find((w: { id: number }) => w.id === worker.id)).toMatchObject({ active: false });
  });
});
