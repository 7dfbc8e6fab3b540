import { afterAll, describe, expect, it } from 'vitest';
import { anonymousAgent, DEMO, DEMO_PASSWORD, signedInAgent, startTestApp, uniqueEmail } from '../support/app';

const t = startTestApp({ LOGIN_MAX_FAILURES: '3' });
const app = t.app;
afterAll(() => t.stop());

describe('health and unknown routes', () => {
  it('reports the database up', async () => {
    const res = await (await anonymousAgent(app)).get('/api/health').expect(200);
    expect(res.body).toEqual({ ok: true, db: 'up' });
  });

  it('answers an unknown API route with the JSON error shape and 404', async () => {
    const res = await (await anonymousAgent(app)).get('/api/no-such-thing').expect(404);
    expect(res.body.error.code).toBe('not_found');
  });

  it('rejects malformed JSON with 400 and no stack trace', async () => {
    const agent = await anonymousAgent(app);
    const res = await agent.post('/api/auth/login').set('X-CSRF-Token', agent.csrf).set('Content-Type', 'application/json').send('{"email": ');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('bad_json');
    expect(JSON.stringify(res.body)).not.toMatch(/at .*\.(ts|js)/);
  });
});

describe('sign-in', () => {
  it('signs in a demo account and reports the user', async () => {
    const agent = await signedInAgent(app, DEMO.planner);
    const me = await agent.get('/api/auth/me').expect(200);
    expect(me.body.user).toMatchObject({ email: DEMO.planner, role: 'planner' });
    expect(me.body.user.password_hash).toBeUndefined();
  });

  it('gives the same message for an unknown e-mail and a wrong password', async () => {
    const agent = await anonymousAgent(app);
    const unknown = await agent.post('/api/auth/login').set('X-CSRF-Token', agent.csrf).send({ email: uniqueEmail('nobody'), password: 'whatever-it-is' });
    const wrong = await agent.post('/api/auth/login').set('X-CSRF-Token', agent.csrf).send({ email: DEMO.tester, password: 'not-the-password' });
    expect(unknown.status).toBe(401);
    expect(wrong.status).toBe(401);
    expect(unknown.body.error.message).toBe(wrong.body.error.message);
  });

  it('validates the sign-in body with field messages', async () => {
    const agent = await anonymousAgent(app);
    const res = await agent.post('/api/auth/login').set('X-CSRF-Token', agent.csrf).send({ email: 'not-an-email' });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['email', 'password']);
  });

  it('rate-limits repeated failures for one e-mail, then refuses even the right password', async () => {
    const email = uniqueEmail('target');
    const agent = await anonymousAgent(app);
    await agent.post('/api/auth/register').set('X-CSRF-Token', agent.csrf).send({ name: 'Rate Target', email, password: 'correct-horse-42' }).expect(202);
    const other = await anonymousAgent(app);
    const statuses: number[] = [];
    for (let i = 0; i < 4; i++) {
      const res = await other.post('/api/auth/login').set('X-CSRF-Token', other.csrf).send({ email, password: `wrong-${i}-password` });
      statuses.push(res.status);
    }
    expect(statuses).toEqual([401, 401, 401, 429]);
    const right = await other.post('/api/auth/login').set('X-CSRF-Token', other.csrf).send({ email, password: 'correct-horse-42' });
    expect(right.status).toBe(429);
  });

  it('logs out', async () => {
    const agent = await signedInAgent(app, DEMO.assembler);
    await agent.post('/api/auth/logout').set('X-CSRF-Token', agent.csrf).expect(204);
    await agent.get('/api/auth/me').expect(401);
  });
});

describe('CSRF defence', () => {
  it('refuses an unsafe request without the token, and with a wrong one', async () => {
    const agent = await signedInAgent(app, DEMO.owner);
    const none = await agent.post('/api/users').send({});
    expect(none.status).toBe(403);
    expect(none.body.error.code).toBe('csrf');
    const wrong = await agent.post('/api/users').set('X-CSRF-Token', 'x'.repeat(32)).send({});
    expect(wrong.status).toBe(403);
    const right = await agent.post('/api/users').set('X-CSRF-Token', agent.csrf).send({});
    expect(right.status).toBe(400);
  });
});

describe('registration', () => {
  it('registers a customer without signing in; the new account then signs in, and the role is always customer', async () => {
    const email = uniqueEmail('new-customer');
    const agent = await anonymousAgent(app);
    const res = await agent.post('/api/auth/register').set('X-CSRF-Token', agent.csrf).send({ name: 'Ada Vale', email: email.toUpperCase(), password: 'long-enough-pass', role: 'owner' });
    expect(res.status).toBe(202);
    expect(Object.keys(res.body)).toEqual(['message']);
    await agent.get('/api/auth/me').expect(401);
    const signedIn = await signedInAgent(app, email, 'long-enough-pass');
    const me = await signedIn.get('/api/auth/me').expect(200);
    expect(me.body.user).toMatchObject({ email, role: 'customer' });
  });

  it('stores a hash, never the password', async () => {
    const email = uniqueEmail('hashcheck');
    const agent = await anonymousAgent(app);
    await agent.post('/api/auth/register').set('X-CSRF-Token', agent.csrf).send({ name: 'Hash Check', email, password: 'plain-text-secret' }).expect(202);
    const row = await t.knex('users').where({ email }).first();
    expect(row.password_hash).not.toContain('plain-text-secret');
    expect(row.password_hash).toMatch(/^\$2[aby]\$12\$/);
  });
});

describe('people and roles (owner)', () => {
  it('creates staff, changes a role, and deactivation ends their session at once', async () => {
    const owner = await signedInAgent(app, DEMO.owner);
    const email = uniqueEmail('bench-hand');
    const created = await owner.post('/api/users').set('X-CSRF-Token', owner.csrf).send({ name: 'Bench Hand', email, role: 'assembler', password: 'first-password-1' });
    expect(created.status).toBe(201);
    const worker = await signedInAgent(app, email, 'first-password-1');
    expect((await worker.get('/api/auth/me')).body.user.role).toBe('assembler');

    await owner.patch(`/api/users/${created.body.user.id}`).set('X-CSRF-Token', owner.csrf).send({ role: 'tester' }).expect(200);
    expect((await worker.get('/api/auth/me')).body.user.role).toBe('tester');

    await owner.patch(`/api/users/${created.body.user.id}`).set('X-CSRF-Token', owner.csrf).send({ active: false }).expect(200);
    await worker.get('/api/auth/me').expect(401);
    const again = await anonymousAgent(app);
    const res = await again.post('/api/auth/login').set('X-CSRF-Token', again.csrf).send({ email, password: 'first-password-1' });
    expect(res.status).toBe(401);
  });

  it('refuses to let the owner deactivate themselves (409)', async () => {
    const owner = await signedInAgent(app, DEMO.owner);
    const me = (await owner.get('/api/auth/me')).body.user;
    const res = await owner.patch(`/api/users/${me.id}`).set('X-CSRF-Token', owner.csrf).send({ active: false });
    expect(res.status).toBe(409);
  });

  it('says which fields are wrong when creating a person', async () => {
    const owner = await signedInAgent(app, DEMO.owner);
    const res = await owner.post('/api/users').set('X-CSRF-Token', owner.csrf).send({ name: '', email: 'x', role: 'wizard', password: 'short' });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['email', 'name', 'password', 'role']);
  });
});

describe('change password', () => {
  it('needs the current password, then the new one works and the old does not', async () => {
    const email = uniqueEmail('pw');
    const anon = await anonymousAgent(app);
    await anon.post('/api/auth/register').set('X-CSRF-Token', anon.csrf).send({ name: 'Pw Person', email, password: 'old-password-1' }).expect(202);
    const agent = await signedInAgent(app, email, 'old-password-1');
    const bad = await agent.post('/api/auth/password').set('X-CSRF-Token', agent.csrf).send({ currentPassword: 'nope-nope-nope', newPassword: 'new-password-2' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.currentPassword).toBeTruthy();
    await agent.post('/api/auth/password').set('X-CSRF-Token', agent.csrf).send({ currentPassword: 'old-password-1', newPassword: 'new-password-2' }).expect(204);
    await signedInAgent(app, email, 'new-password-2');
    await expect(signedInAgent(app, email, 'old-password-1')).rejects.toThrow(/401/);
  });

  it('leaves demo passwords alone', async () => {
    await signedInAgent(app, DEMO.customer, DEMO_PASSWORD);
  });
});
