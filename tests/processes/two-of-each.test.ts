// Two web and two worker processes on one database, as a shop behind a reverse proxy would run:
// a session made on one web process works on the other, a sign-in limit counts across both, and
// every background job (mail, sheet archives) is done once however many workers look for it.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startMailFake, type MailFake } from '../../server/fakes/mail';
import { enqueueMail } from '../../server/services/mail/outbox';
import { startTestApp, uniqueEmail } from '../support/app';
import { insertBatch } from '../api/spec-sheets-setup';
import { Client, freePort, killChildren, printed, startRole, waitFor, webReady, WORKER_READY } from './support';

const t = startTestApp();
let mail: MailFake;
const webs: string[] = [];
const workers: ReturnType<typeof startRole>[] = [];

beforeAll(async () => {
  mail = await startMailFake({ smtpPort: 0, httpPort: 0 });
  const shared = { LOGIN_MAX_FAILURES: '3', OUTBOX_POLL_SECONDS: '0.5', SMTP_PORT: String(mail.smtpPort), MAIL_INBOX_URL: mail.httpUrl };
  for (const name of ['a', 'b']) {
    const port = await freePort();
    startRole('web', `two-web-${name}`, { ...shared, PORT: String(port) });
    webs.push(`http://127.0.0.1:${port}`);
    workers.push(startRole('worker', `two-worker-${name}`, shared));
  }
  await Promise.all(webs.map((url) => webReady(url, 240_000)));
  await Promise.all(workers.map((worker) => printed(worker, WORKER_READY, 240_000)));
}, 300_000);

afterAll(async () => {
  await killChildren();
  await mail?.close();
  await t.stop();
});

describe('2 web + 2 worker processes on one database', () => {
  it('shares sessions: signed in on web A, the same cookie is signed in on web B, and signing out on B ends it on A', async () => {
    const onA = new Client(webs[0]);
    expect((await onA.signIn('planner@shop.example', 'kneepoint-demo')).status).toBe(200);
    const onB = onA.via(webs[1]);
    const me = await onB.request('GET', '/api/auth/me');
    expect(me.status).toBe(200);
    expect(me.body.user.email).toBe('planner@shop.example');
    expect((await onB.request('POST', '/api/auth/logout')).status).toBeLessThan(300);
    expect((await onA.request('GET', '/api/auth/me')).status).toBe(401);
  });

  it('shares the sign-in limit: three failures spread over both web processes block the fourth on either', async () => {
    const email = uniqueEmail('limit');
    const a = new Client(webs[0]);
    const b = new Client(webs[1]);
    try {
      expect((await a.signIn(email, 'not-the-password-1')).status).toBe(401);
      expect((await b.signIn(email, 'not-the-password-2')).status).toBe(401);
      expect((await a.signIn(email, 'not-the-password-3')).status).toBe(401);
      expect((await b.signIn(email, 'not-the-password-4')).status).toBe(429);
    } finally {
      await t.knex('rate_limits').where('key', 'like', `%${email}%`).delete();
    }
  });

  it('does each job once: every queued mail arrives exactly once and each sheet unit is made once', async () => {
    const recipients = Array.from({ length: 12 }, () => uniqueEmail('once'));
    await t.knex.transaction(async (trx) => {
      for (const [i, to] of recipients.entries()) {
        await enqueueMail(trx, { dedupeKey: `two-of-each:${to}`, template: 'welcome', to, data: { name: `Tester ${i}` } });
      }
    });
    // Two archives requested through the two web processes.
    const planner = new Client(webs[0]);
    expect((await planner.signIn('planner@shop.example', 'kneepoint-demo')).status).toBe(200);
    const batches = [await insertBatch(t.knex, [{ vf: [1.79, 0.6] }, { vf: [1.8, 0.61] }]), await insertBatch(t.knex, [{ vf: [1.81, 0.6] }, { vf: [1.82, 0.59] }])];
    const jobIds: number[] = [];
    for (const [i, batch] of batches.entries()) {
      const res = await planner.via(webs[i]).request('POST', `/api/batches/${batch.batchId}/spec-sheets`);
      expect(res.status).toBe(202);
      jobIds.push(res.body.job.id);
    }

    await waitFor('every mail to be sent', async () =>
      (await t.knex('outbox').whereIn('to_address', recipients).where('status', 'sent').count({ n: '*' }).first())?.n === recipients.length, 90_000, 200);
    const jobs = await waitFor('both archives', async () => {
      const rows = await t.knex('sheet_jobs').whereIn('id', jobIds).select('id', 'state', 'done', 'total');
      return rows.every((r) => r.state === 'finished') && rows;
    }, 120_000, 200);
    expect(jobs.map((j) => j.done)).toEqual([2, 2]);

    const inbox = await (await fetch(`${mail.httpUrl}/messages`)).json() as { to: string[] }[];
    for (const to of recipients) expect(inbox.filter((m) => m.to.includes(to))).toHaveLength(1);
    const units = await t.knex('sheet_job_units').whereIn('job_id', jobIds).select('job_id', 'unit_id', 'lease_token');
    expect(units).toHaveLength(4);
    // No job changed hands: one lease each.
    for (const id of jobIds) expect(new Set(units.filter((u) => u.job_id === id).map((u) => u.lease_token)).size).toBe(1);
  }, 240_000);
});
