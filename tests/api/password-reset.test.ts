// "Forgot password" end to end: the request answers alike for any address, the link arrives by real
// SMTP at the mail fake, the token is stored only as a hash, works once and for an hour, the new
// password passes the one password rule, and a reset ends the account's other sessions.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startMailFake, type MailFake } from '../../server/fakes/mail/index';
import { hashResetToken, RESET_LINK_DEAD } from '../../server/services/password-resets';
import { createMailer, sendDueMail } from '../../server/services/mail/sender';
import { anonymousAgent, DEMO, signedInAgent, startTestApp, uniqueEmail } from '../support/app';
import { listen } from '../support/browser';
import { freshLoopback, LoopbackClient } from '../support/net';

let mail: MailFake;
let t: ReturnType<typeof startTestApp>;
let server: Awaited<ReturnType<typeof listen>>;

beforeAll(async () => {
  mail = await startMailFake({ smtpPort: 0, httpPort: 0 });
  t = startTestApp({
    SMTP_PORT: String(mail.smtpPort), MAIL_INBOX_URL: mail.httpUrl,
    PASSWORD_RESET_MAX_PER_ADDRESS: '4', PASSWORD_RESET_MAX_PER_ACCOUNT: '2', PASSWORD_RESET_CONFIRM_MAX_FAILURES: '3',
  });
  server = await listen(t.app);
});
afterAll(async () => {
  await server?.close();
  await t?.stop();
  await mail?.close();
});

// Every test talks from a loopback address of its own, so the small per-address limits are its own.
const client = () => new LoopbackClient(server.url, freshLoopback()).start();

async function newAccount(password = 'first-long-password') {
  const email = uniqueEmail('reset');
  const res = await (await client()).post('/api/auth/register', { name: 'Wren Okafor', email, password });
  expect(res.status).toBe(202);
  return email;
}

/** Asks for a link, sends the outbox through SMTP, and reads the token from the delivered mail. */
async function linkFor(email: string) {
  expect((await (await client()).post('/api/auth/password-reset', { email })).status).toBe(202);
  await sendDueMail(t.knex, createMailer(t.config), t.config, 200);
  const [summary] = (await (await fetch(`${mail.httpUrl}/messages?to=${encodeURIComponent(email)}`)).json()) as { id: string; subject: string }[];
  expect(summary.subject).toMatch(/new password/i);
  const full = (await (await fetch(`${mail.httpUrl}/messages/${summary.id}`)).json()) as { text: string; html: string };
  const url = new URL(full.text.match(/https?:\/\/\S+reset-password\?token=\S+/)![0]);
  expect(url.origin).toBe(new URL(t.config.publicUrl).origin);
  return { token: url.searchParams.get('token')!, text: full.text };
}

const confirm = async (token: string, password: string) => (await client()).post('/api/auth/password-reset/confirm', { token, password });

describe('asking for a reset link', () => {
  it('answers an account, a stranger and a deactivated account alike, and mails only the account', async () => {
    const email = await newAccount();
    const stranger = uniqueEmail('nobody');
    const gone = await newAccount();
    await t.knex('users').where({ email: gone }).update({ active: false });
    const answers = await Promise.all([email, stranger, gone].map(async (e) => (await client()).post('/api/auth/password-reset', { email: e })));
    for (const a of answers) {
      expect(a.status).toBe(202);
      expect(a.body).toEqual(answers[0].body);
    }
    expect(await t.knex('outbox').where({ to_address: email, template: 'password-reset' })).toHaveLength(1);
    expect(await t.knex('outbox').where({ to_address: stranger })).toHaveLength(0);
    expect(await t.knex('outbox').where({ to_address: gone, template: 'password-reset' })).toHaveLength(0);
  });

  it('stores only a hash of the token, and the sent outbox row keeps no working link', async () => {
    const email = await newAccount();
    const { token } = await linkFor(email);
    expect(token.length).toBeGreaterThanOrEqual(40);
    const user = await t.knex('users').where({ email }).first('id');
    const rows = await t.knex('password_resets').where({ user_id: user.id });
    expect(rows).toHaveLength(1);
    expect(rows[0].token_hash).toBe(hashResetToken(token));
    expect(JSON.stringify(rows[0])).not.toContain(token);
    const sent = await t.knex('outbox').where({ to_address: email, template: 'password-reset' }).first();
    expect(sent.status).toBe('sent');
    expect(JSON.stringify(sent.data)).not.toContain(token);
    // An hour, both times from the database's clock in one statement.
    const minutes = (rows[0].expires_at.getTime() - rows[0].created_at.getTime()) / 60_000;
    expect(minutes).toBe(60);
  });

  it('is limited per address and per e-mail typed, whatever X-Forwarded-For says', async () => {
    const c = await client();
    const perAddress: number[] = [];
    for (let i = 0; i < 6; i++) perAddress.push((await c.post('/api/auth/password-reset', { email: uniqueEmail('spray') }, { 'x-forwarded-for': `198.51.100.${i}` })).status);
    expect(perAddress).toEqual([202, 202, 202, 202, 429, 429]);
    // One address asked for from many places: after two, the third is refused (its inbox is not flooded).
    const email = await newAccount();
    const perAccount: number[] = [];
    for (let i = 0; i < 3; i++) perAccount.push((await (await client()).post('/api/auth/password-reset', { email })).status);
    expect(perAccount).toEqual([202, 202, 429]);
    expect(await t.knex('outbox').where({ to_address: email, template: 'password-reset' })).toHaveLength(2);
  });

  it('refuses a malformed address with a field message', async () => {
    const res = await (await client()).post('/api/auth/password-reset', { email: 'not-an-address' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.email).toBeTruthy();
  });
});

describe('setting a new password from the link', () => {
  it('works once, ends the account’s other sessions, and leaves other accounts signed in', async () => {
    const email = await newAccount('old-long-password');
    const here = await signedInAgent(t.app, email, 'old-long-password');
    const phone = await signedInAgent(t.app, email, 'old-long-password');
    const bystander = await signedInAgent(t.app, DEMO.planner);
    const { token } = await linkFor(email);

    const done = await confirm(token, 'new-long-password');
    expect(done.status).toBe(204);
    await here.get('/api/auth/me').expect(401);
    await phone.get('/api/auth/me').expect(401);
    await bystander.get('/api/auth/me').expect(200);
    await signedInAgent(t.app, email, 'new-long-password');
    await expect(signedInAgent(t.app, email, 'old-long-password')).rejects.toThrow(/401/);

    // The same link again is dead, and the password stays the one just set.
    const again = await confirm(token, 'third-long-password');
    expect(again.status).toBe(400);
    expect(again.body.error.fields.token).toBe(RESET_LINK_DEAD);
    await signedInAgent(t.app, email, 'new-long-password');
  });

  it('spends every other link of the account when one is used', async () => {
    const email = await newAccount();
    const first = await linkFor(email);
    await fetch(`${mail.httpUrl}/messages`, { method: 'DELETE' });
    const second = await linkFor(email);
    expect(second.token).not.toBe(first.token);
    expect((await confirm(second.token, 'chosen-long-password')).status).toBe(204);
    expect((await confirm(first.token, 'another-long-password')).status).toBe(400);
  });

  it('is dead after an hour', async () => {
    const email = await newAccount('kept-long-password');
    const { token } = await linkFor(email);
    // The link was mailed 61 minutes ago.
    await t.knex('password_resets').where({ token_hash: hashResetToken(token) })
      .update({ created_at: t.knex.raw(`now() - interval '61 minutes'`), expires_at: t.knex.raw(`now() - interval '1 minute'`) });
    const res = await confirm(token, 'late-long-password');
    expect(res.status).toBe(400);
    expect(res.body.error.fields.token).toBe(RESET_LINK_DEAD);
    await signedInAgent(t.app, email, 'kept-long-password');
  });

  it('applies the one password rule, including the e-mail itself, and keeps the link usable', async () => {
    const email = await newAccount();
    const { token } = await linkFor(email);
    for (const password of ['short', 'password123', email]) {
      const res = await confirm(token, password);
      expect(res.status, password).toBe(400);
      expect(res.body.error.fields.password, password).toBeTruthy();
    }
    expect((await confirm(token, 'finally-a-good-one')).status).toBe(204);
  });

  it('answers an unknown token like a used one, and limits wrong links per address', async () => {
    const c = await client();
    const statuses: number[] = [];
    for (let i = 0; i < 4; i++) {
      const res = await c.post('/api/auth/password-reset/confirm', { token: `made-up-token-${i}`, password: 'guessing-long-password' });
      statuses.push(res.status);
      if (res.status === 400) expect(res.body.error.fields.token).toBe(RESET_LINK_DEAD);
    }
    expect(statuses).toEqual([400, 400, 400, 429]);
  });

  it('needs the CSRF token like every other write', async () => {
    const anon = await anonymousAgent(t.app);
    await anon.post('/api/auth/password-reset').send({ email: DEMO.customer }).expect(403);
  });
});
