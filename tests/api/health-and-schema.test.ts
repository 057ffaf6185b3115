import { afterAll, describe, expect, it } from 'vitest';
import { getMigrations } from 'better-auth/db/migration';
import { Client } from '../setup/client';
import { closeTestDb, testDb } from '../setup/db';

afterAll(closeTestDb);

describe('health', () => {
  it('answers ok with the database up', async () => {
    const r = await new Client().get('/api/health');
    expect(r.status).toBe(200);
    expect(r.body).toEqual({ ok: true, db: 'up' });
  });

  it('sets security headers', async () => {
    const r = await new Client().get('/sign-in');
    expect(r.status).toBe(200);
    expect(r.headers['content-security-policy']).toContain("frame-ancestors 'none'");
    expect(r.headers['x-content-type-options']).toBe('nosniff');
    expect(r.headers['referrer-policy']).toBe('strict-origin-when-cross-origin');
    // Astro's policy with the hashes of its inline scripts, then ours.
    expect(r.headers['content-security-policy']).toMatch(/script-src[^;]*'sha256-/);
  });

  it('answers an unknown page with the 404 page', async () => {
    const r = await new Client().get('/no-such-place');
    expect(r.status).toBe(404);
  });
});

describe('schema', () => {
  it("matches what better-auth expects (the migrations own its tables)", async () => {
    const { auth } = await import('../../src/server/auth/auth');
    const { toBeCreated, toBeAdded } = await getMigrations(auth().options);
    expect(toBeCreated.map((t) => t.table)).toEqual([]);
    expect(toBeAdded.map((t) => `${t.table}: ${Object.keys(t.fields).join(',')}`)).toEqual([]);
  });

  it('has no column with ON UPDATE CURRENT_TIMESTAMP', async () => {
    const [rows] = await testDb().raw("SELECT table_name, column_name FROM information_schema.columns WHERE table_schema = DATABASE() AND extra LIKE '%on update%'");
    expect(rows).toEqual([]);
  });

  it('gives every domain table an organization_id and keeps money in *_cents BIGINT', async () => {
    const [tables] = await testDb().raw("SELECT table_name AS t FROM information_schema.tables WHERE table_schema = DATABASE()");
    const authTables = new Set(['user', 'session', 'account', 'verification', 'organization', 'member', 'invitation', 'rateLimit', 'knex_migrations', 'knex_migrations_lock', 'outbox']);
    const [cols] = await testDb().raw('SELECT table_name AS t, column_name AS c, data_type AS d FROM information_schema.columns WHERE table_schema = DATABASE()');
    for (const { t } of tables as { t: string }[]) {
      if (authTables.has(t)) continue;
      expect((cols as { t: string; c: string }[]).some((c) => c.t === t && c.c === 'organization_id'), t).toBe(true);
    }
    for (const c of cols as { t: string; c: string; d: string }[]) {
      if (c.c.endsWith('_cents')) expect(c.d, `${c.t}.${c.c}`).toBe('bigint');
    }
  });

  it('runs MariaDB with full durability', async () => {
    const [rows] = await testDb().raw("SHOW VARIABLES WHERE Variable_name IN ('innodb_flush_log_at_trx_commit', 'innodb_doublewrite', 'character_set_server', 'time_zone')");
    const v = Object.fromEntries((rows as { Variable_name: string; Value: string }[]).map((r) => [r.Variable_name, r.Value]));
    expect(v.innodb_flush_log_at_trx_commit).toBe('1');
    expect(v.innodb_doublewrite).toBe('ON');
    expect(v.character_set_server).toBe('utf8mb4');
  });
});
