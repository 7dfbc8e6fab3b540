// A production server must run on its own secrets: never missing, never one published here.
import { spawnSync } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadConfig } from '../../server/config';
import { PRODUCTION_SECRETS } from '../../server/secrets';
import { secretsInRepository } from '../support/repo-secrets';

const ROOT = path.resolve(import.meta.dirname, '..', '..');
// An install's own values, as `npm start` makes them (random, never written in the repository).
const OWN = {
  SESSION_SECRET: randomBytes(16).toString('hex'),
  PAYMENTS_API_KEY: `sk_test_${randomBytes(16).toString('hex')}`,
  PAYMENTS_WEBHOOK_SECRET: `whsec_${randomBytes(16).toString('hex')}`,
};
const base = { DATABASE_URL: 'postgres://u:p@127.0.0.1:1/db', NODE_ENV: 'production', COOKIE_SECURE: 'false' };
const production = (env: Record<string, string | undefined>) => () => loadConfig({ ...base, ...OWN, ...env } as NodeJS.ProcessEnv);

describe('a production configuration', () => {
  it('starts with its own secrets, with Secure cookies unless told it is plain http on loopback', () => {
    expect(production({})().cookieSecure).toBe(false);
    expect(production({ COOKIE_SECURE: undefined })().cookieSecure).toBe(true);
    expect(production({ COOKIE_SECURE: undefined, PUBLIC_URL: 'https://shop.example' })().cookieSecure).toBe(true);
    // Plain cookies for a public https address is a mistake, refused by name.
    expect(production({ PUBLIC_URL: 'https://shop.example' })).toThrow(/COOKIE_SECURE/);
  });

  it('refuses to start when a secret is missing, naming each missing variable', () => {
    for (const name of PRODUCTION_SECRETS) expect(production({ [name]: undefined })).toThrow(new RegExp(`${name}: missing`));
    const none = production({ SESSION_SECRET: undefined, PAYMENTS_API_KEY: undefined, PAYMENTS_WEBHOOK_SECRET: undefined });
    expect(none).toThrow(/SESSION_SECRET[\s\S]*PAYMENTS_API_KEY[\s\S]*PAYMENTS_WEBHOOK_SECRET/);
  });

  it('refuses every secret-like value found in the repository, for each secret, naming the variable', () => {
    const found = secretsInRepository();
    // The defaults and test values are in there (so the grep works), and the grep grows with the repository.
    expect(found).toEqual(expect.arrayContaining(['sk_test_kneepoint_local', 'whsec_kneepoint_local', 'test-secret-not-for-production']));
    for (const value of found) {
      for (const name of PRODUCTION_SECRETS) expect(production({ [name]: value }), `${name}=${value}`).toThrow(new RegExp(name));
    }
  });

  it('refuses anything starting with the repository’s development prefixes', () => {
    expect(production({ PAYMENTS_WEBHOOK_SECRET: 'whsec_kneepoint_a_new_one_nobody_listed' })).toThrow(/PAYMENTS_WEBHOOK_SECRET: is a development or test value/);
    expect(production({ PAYMENTS_API_KEY: 'sk_test_kneepoint_another_one_here' })).toThrow(/PAYMENTS_API_KEY/);
  });

  it('keeps working defaults in development and tests', () => {
    const dev = loadConfig({ DATABASE_URL: base.DATABASE_URL, SESSION_SECRET: 'test-secret-not-for-production', NODE_ENV: 'development' });
    expect(dev.PAYMENTS_WEBHOOK_SECRET).toBe('whsec_kneepoint_local');
    expect(dev.cookieSecure).toBe(false);
    expect(dev.trustProxy).toBe(false);
  });

  it('trusts proxies only as configured', () => {
    expect(production({})().trustProxy).toBe(false);
    expect(production({ TRUST_PROXY: '1' })().trustProxy).toBe(1);
    expect(production({ TRUST_PROXY: 'loopback, 10.0.0.0/8' })().trustProxy).toBe('loopback, 10.0.0.0/8');
  });
});

describe('the server process', () => {
  it('exits at start in production without its own secrets, saying which are missing', () => {
    const env = { PATH: process.env.PATH, DATABASE_URL: process.env.DATABASE_URL, NODE_ENV: 'production', PORT: '0', PAYMENTS_WEBHOOK_SECRET: 'whsec_kneepoint_local' };
    const run = spawnSync(path.join(ROOT, 'node_modules/.bin/tsx'), ['scripts/serve.ts'], { cwd: ROOT, env, encoding: 'utf8', timeout: 60_000 });
    expect(run.status).not.toBe(0);
    expect(run.stderr).toMatch(/SESSION_SECRET/);
    expect(run.stderr).toMatch(/PAYMENTS_API_KEY: missing/);
    expect(run.stderr).toMatch(/PAYMENTS_WEBHOOK_SECRET: is a development or test value/);
    expect(run.stdout).not.toContain('is up at');
  });
});
