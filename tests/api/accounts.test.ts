// Accounts: registration that reveals nothing, the password rule, limits that a client cannot
// dodge by rotating X-Forwarded-For, and a password change that ends the other sessions.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { passwordProblem } from '../../shared/schemas/password';
import { DEMO, DEMO_PASSWORD, signedInAgent, startTestApp, uniqueEmail } from '../support/app';
import { listen } from '../support/browser';
import { freshLoopback, LoopbackClient } from '../support/net';

// Small limits, and the default of trusting no proxy; every test talks from a loopback address of its own.
const t = startTestApp({
  LOGIN_MAX_FAILURES: '3', LOGIN_ADDRESS_MAX_FAILURES: '5', REGISTER_MAX_PER_ADDRESS: '3', PASSWORD_CHANGE_MAX_FAILURES: '2',
});
let server: Awaited<ReturnType<typeof listen>>;
beforeAll(async () => {
  server = await listen(t.app);
  // Earlier test files' failed sign-ins (demo accounts, 127.0.0.1) must not count against these small limits.
  await t.knex('rate_limits').where('key', 'like', 'login-%').delete();
});
afterAll(async () => { await server.close(); await t.stop(); });

const client = () => new LoopbackClient(server.url, freshLoopback()).start();
const spoofed = (i: number) => ({ 'x-forwarded-for': `198.51.100.${i % 250}` }); // documentation range (RFC 5737)

async function register(email: string, password = 'saltmarsh-reverb-tank', name = 'Ola Brenn') {
  return (await client()).post('/api/auth/register', { name, email, password });
}

describe('registration', () => {
  it('answers a new and a taken e-mail alike; the owner of the taken one gets a mail instead of a welcome', async () => {
    const fresh = await register(uniqueEmail('fresh'));
    const taken = await register(DEMO.customer, 'someone-elses-guess-77', 'Mallory');
    expect(taken.status).toBe(fresh.status);
    expect(fresh.status).toBe(202);
    expect(taken.body).toEqual(fresh.body);
    const owner = await t.knex('users').where({ email: DEMO.customer }).first();
    expect(owner.name).not.toBe('Mallory');
    const mail = await t.knex('outbox').where({ to_address: DEMO.customer }).andWhere('dedupe_key', 'like', `account-exists:${owner.id}:%`);
    expect(mail).toHaveLength(1);
    expect(mail[0].template).toBe('account-exists');
    expect(await t.knex('outbox').where({ dedupe_key: `welcome:${owner.id}` })).toHaveLength(0);
    // The owner's password still works; the one typed by the stranger does not.
    await signedInAgent(t.app, DEMO.customer, DEMO_PASSWORD);
    await expect(signedInAgent(t.app, DEMO.customer, 'someone-elses-guess-77')).rejects.toThrow(/401/);
  });

  it('is limited per address, and a rotating X-Forwarded-For does not reset the count', async () => {
    const c = await client();
    const statuses: number[] = [];
    for (let i = 0; i < 5; i++) statuses.push((await c.post('/api/auth/register', { name: 'Flood', email: uniqueEmail('flood'), password: 'saltmarsh-reverb-tank' }, spoofed(i))).status);
    expect(statuses).toEqual([202, 202, 202, 429, 429]);
  });
});

describe('the password rule', () => {
  it('refuses short, long, breached, repetitive and sequential passwords and the e-mail itself, with a field message', async () => {
    const email = uniqueEmail('rules');
    const refused = ['short-one', 'x'.repeat(201), '1234567890', 'password123', 'qwertyuiop', ' '.repeat(10), 'aaaaaaaaaaaa', 'abcdefghijk', email, email.split('@')[0]];
    for (const password of refused) {
      const res = await register(email, password);
      expect(res.status, JSON.stringify(password)).toBe(400);
      expect(res.body.error.fields.password, JSON.stringify(password)).toBeTruthy();
    }
    expect(await t.knex('users').where({ email })).toHaveLength(0);
    expect((await register(email, 'copper-spruce-paper-7')).status).toBe(202);
  });

  it('is the same rule for a password change, and the demo password passes it', async () => {
    expect(passwordProblem(DEMO_PASSWORD, DEMO.owner)).toBeNull();
    const email = uniqueEmail('changer');
    await register(email, 'first-long-password');
    const agent = await signedInAgent(t.app, email, 'first-long-password');
    for (const newPassword of ['iloveyou12', email]) {
      const res = await agent.post('/api/auth/password').set('X-CSRF-Token', agent.csrf).send({ currentPassword: 'first-long-password', newPassword });
      expect(res.status).toBe(400);
      expect(res.body.error.fields.newPassword).toBeTruthy();
    }
  });
});

describe('sign-in limits', () => {
  it('count failures per address across e-mails, whatever X-Forwarded-For says', async () => {
    const c = await client();
    const statuses: number[] = [];
    for (let i = 0; i < 7; i++) statuses.push((await c.post('/api/auth/login', { email: uniqueEmail('spray'), password: 'not-this-one-either' }, spoofed(i))).status);
    expect(statuses).toEqual([401, 401, 401, 401, 401, 429, 429]);
  });

  it('count failures per account across addresses, and then refuse even the right password', async () => {
    const email = uniqueEmail('target');
    await register(email, 'the-right-password');
    const statuses: number[] = [];
    for (let i = 0; i < 4; i++) statuses.push((await (await client()).post('/api/auth/login', { email, password: `wrong-guess-${i}` })).status);
    expect(statuses).toEqual([401, 401, 401, 429]);
    expect((await (await client()).post('/api/auth/login', { email, password: 'the-right-password' })).status).toBe(429);
  });
});

describe('changing a password', () => {
  it('ends the account’s other sessions and keeps the one that made the change', async () => {
    const email = uniqueEmail('sessions');
    await register(email, 'before-the-change');
    const here = await signedInAgent(t.app, email, 'before-the-change');
    const elsewhere = await signedInAgent(t.app, email, 'before-the-change');
    const bystander = await signedInAgent(t.app, DEMO.planner);
    await here.post('/api/auth/password').set('X-CSRF-Token', here.csrf).send({ currentPassword: 'before-the-change', newPassword: 'after-the-change' }).expect(204);
    await here.get('/api/auth/me').expect(200);
    await elsewhere.get('/api/auth/me').expect(401);
    await bystander.get('/api/auth/me').expect(200);
  });

  it('is limited per account after wrong current passwords', async () => {
    const email = uniqueEmail('pwlimit');
    await register(email, 'genuine-password-1');
    const agent = await signedInAgent(t.app, email, 'genuine-password-1');
    const attempt = (currentPassword: string) => agent.post('/api/auth/password').set('X-CSRF-Token', agent.csrf).send({ currentPassword, newPassword: 'genuine-password-2' });
    expect((await attempt('wrong-guess-a')).status).toBe(400);
    expect((await attempt('wrong-guess-b')).status).toBe(400);
    expect((await attempt('genuine-password-1')).status).toBe(429);
  });
});
