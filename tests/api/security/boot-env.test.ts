import { spawn } from 'node:child_process';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { productionProblems, weakSecret } from '../../../src/server/env';
import { freePort } from '../../setup/processes';
import { stack } from '../../setup/stack';

/** Runs a process of the app with the test stack's environment changed; its exit code and output. */
async function boot(script: string[], change: Record<string, string | undefined>): Promise<{ code: number | null; out: string }> {
  const env: NodeJS.ProcessEnv = { ...process.env, ...stack().appEnv, PORT: String(await freePort()), HOST: '127.0.0.1' };
  for (const [k, v] of Object.entries(change)) {
    if (v === undefined) delete env[k];
    else env[k] = v;
  }
  return new Promise((resolve) => {
    const child = spawn(process.execPath, script, { cwd: stack().root, env, stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    child.stdout.on('data', (d) => { out += d; });
    child.stderr.on('data', (d) => { out += d; });
    // A server that starts would listen for ever: that is a failure here, so stop it.
    const timer = setTimeout(() => child.kill('SIGKILL'), 45_000);
    child.on('exit', (code) => { clearTimeout(timer); resolve({ code, out }); });
  });
}

const serve = () => [path.join(stack().root, 'src/cli/serve.mjs')];
const worker = () => ['--import', 'tsx', path.join(stack().root, 'src/cli/worker.ts')];

/** Each: the variable named in the refusal, and the values that must stop a production start. */
const BAD: [string, Record<string, string | undefined>][] = [
  ['AUTH_SECRET', { AUTH_SECRET: undefined }],
  ['AUTH_SECRET', { AUTH_SECRET: 'a'.repeat(32) }],
  ['AUTH_SECRET', { AUTH_SECRET: 'ab'.repeat(20) }],
  ['AUTH_SECRET', { AUTH_SECRET: 'short-but-mixed-9' }],
  ['AUTH_SECRET', { AUTH_SECRET: '0123456789abcdef'.repeat(2) }],
  ['LINK_SIGNING_SECRET', { LINK_SIGNING_SECRET: undefined }],
  ['LINK_SIGNING_SECRET', { LINK_SIGNING_SECRET: 'x'.repeat(48) }],
  ['LINK_SIGNING_SECRET', { LINK_SIGNING_SECRET: stack().appEnv.AUTH_SECRET }],
  ['STRIPE_SECRET_KEY', { STRIPE_SECRET_KEY: undefined }],
  ['STRIPE_SECRET_KEY', { STRIPE_SECRET_KEY: 'sk_test_local' }],
  ['STRIPE_SECRET_KEY', { STRIPE_SECRET_KEY: 'sk_test_tallypost_local' }],
  ['STRIPE_SECRET_KEY', { STRIPE_SECRET_KEY: 'not-a-stripe-key-but-long-enough-123456' }],
  ['STRIPE_WEBHOOK_SECRET', { STRIPE_WEBHOOK_SECRET: undefined }],
  ['STRIPE_WEBHOOK_SECRET', { STRIPE_WEBHOOK_SECRET: 'whsec_local_development_secret' }],
  ['STRIPE_WEBHOOK_SECRET', { STRIPE_WEBHOOK_SECRET: 'whsec_0000000000000000000000000000000000' }],
  ['APP_URL', { APP_URL: undefined }],
  ['APP_URL', { APP_URL: 'http://fence.example' }],
  ['APP_URL', { APP_URL: 'not a url' }],
  ['STRIPE_API_BASE', { STRIPE_API_BASE: 'https://payments.elsewhere.example' }],
];

describe('production refuses to start half configured', () => {
  it("the test stack's own environment passes (it runs in production mode)", () => {
    expect(stack().appEnv.NODE_ENV).toBe('production');
    expect(productionProblems(stack().appEnv)).toEqual([]);
  });

  it('judges secrets by length and variety', () => {
    for (const weak of ['a'.repeat(32), 'abcdefghijklmnopqrstuvwxyzabcdef'.slice(0, 31), 'ab'.repeat(16), 'abcdefgh'.repeat(4), 'abcdefghijklmnopqrstuvwxyzABCDEF']) {
      expect(weakSecret(weak), weak).not.toBeNull();
    }
    for (const strong of ['9f2c4e7a1b8d3f6a0c5e9b2d7f1a4c8e', 'Kx7#pQ2v!Lm9zR4t@Wn6yB1s$Hd3jF8g', 'fence gate rail post bay infill 42 sawhorse']) {
      expect(weakSecret(strong), strong).toBeNull();
    }
  });

  it('outside production only the signing secrets are checked', () => {
    const dev = { ...stack().appEnv, NODE_ENV: 'development', APP_URL: undefined, STRIPE_SECRET_KEY: undefined, STRIPE_WEBHOOK_SECRET: undefined };
    expect(productionProblems(dev)).toEqual([]);
    expect(productionProblems({ ...dev, AUTH_SECRET: 'a'.repeat(32) }).map((p) => p.variable)).toEqual(['AUTH_SECRET']);
  });

  it('the built server exits at boot, naming the variable, for each missing or development value', async () => {
    const results: string[] = [];
    // A few at a time: each start loads the boot check, and the machine is shared.
    for (let i = 0; i < BAD.length; i += 4) {
      await Promise.all(BAD.slice(i, i + 4).map(async ([variable, change]) => {
        const r = await boot(serve(), change);
        const label = `${variable} = ${JSON.stringify(Object.values(change)[0] ?? '(unset)')}`;
        expect(r.code, `${label}: ${r.out.slice(0, 300)}`).toBe(1);
        expect(r.out, label).toContain('will not start');
        expect(r.out, label).toMatch(new RegExp(`\\b${variable}\\b`));
        results.push(label);
      }));
    }
    console.log(`boot check: the server refused all ${results.length} half-configured environments`);
  }, 300_000);

  it('the outbox worker refuses the same way', async () => {
    const r = await boot(worker(), { STRIPE_WEBHOOK_SECRET: 'whsec_local_development_secret' });
    expect(r.code).toBe(1);
    expect(r.out).toContain('STRIPE_WEBHOOK_SECRET');
  }, 60_000);
});
