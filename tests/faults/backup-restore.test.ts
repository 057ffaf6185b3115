import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, statSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import knexFactory from 'knex';
import { knexConfig } from '../../src/server/db-config';
import { stack } from '../setup/stack';
import { closeTestDb, testDb } from '../setup/db';

const dir = mkdtempSync(path.join(os.tmpdir(), 'tallypost-backup-'));
afterAll(async () => {
  rmSync(dir, { recursive: true, force: true });
  await closeTestDb();
});

async function tableFacts(url: string) {
  const k = knexFactory(knexConfig(url, { min: 0, max: 1 }));
  try {
    const [tables] = await k.raw("SELECT table_name AS t FROM information_schema.tables WHERE table_schema = DATABASE() AND table_type = 'BASE TABLE' ORDER BY table_name");
    const out: Record<string, { rows: number; checksum: string }> = {};
    for (const { t } of tables as { t: string }[]) {
      const [[{ n }]] = await k.raw(`SELECT COUNT(*) AS n FROM \`${t}\``);
      const [[c]] = await k.raw(`CHECKSUM TABLE \`${t}\``);
      out[t] = { rows: Number(n), checksum: String(c.Checksum) };
    }
    return out;
  } finally {
    await k.destroy();
  }
}

describe('npm run db:backup and db:restore', () => {
  it('dump a consistent copy and restore it into a fresh database with equal rows and checksums', async () => {
    const file = path.join(dir, 'backup.sql.gz');
    const env = { ...process.env, DATABASE_URL: stack().databaseUrl };
    // Hold writes still so "before" is exactly what the dump saw.
    await testDb().raw('FLUSH TABLES');
    const b = spawnSync('npm', ['run', '--silent', 'db:backup', '--', file], { cwd: stack().root, env, encoding: 'utf8' });
    expect(b.status, b.stderr).toBe(0);
    expect(statSync(file).size).toBeGreaterThan(1000);
    const before = await tableFacts(stack().databaseUrl);
    const into = `tallypost_restore_${Date.now()}`;
    const r = spawnSync('npm', ['run', '--silent', 'db:restore', '--', file, '--into', into], { cwd: stack().root, env, encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    const restoredUrl = stack().databaseUrl.replace(/\/[^/]+$/, `/${into}`);
    const after = await tableFacts(restoredUrl);
    expect(Object.keys(after)).toEqual(Object.keys(before));
    for (const t of Object.keys(before)) {
      expect(after[t].rows, t).toBe(before[t].rows);
      expect(after[t].checksum, t).toBe(before[t].checksum);
    }
    console.log(`restored ${Object.keys(after).length} tables, ${Object.values(after).reduce((s, x) => s + x.rows, 0)} rows, checksums equal`);
    // A second restore into the now-full database is refused unless forced.
    const again = spawnSync('npm', ['run', '--silent', 'db:restore', '--', file, '--into', into], { cwd: stack().root, env, encoding: 'utf8' });
    expect(again.status).not.toBe(0);
    expect(again.stderr).toContain('not empty');
    await testDb().raw(`DROP DATABASE \`${into}\``);
  });
});
