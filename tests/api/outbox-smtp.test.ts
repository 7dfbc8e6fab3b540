import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { startMailFake, type MailFake } from '../../server/fakes/mail/index';
import { startJobs } from '../../server/jobs/boss';
import { outboxJob } from '../../server/jobs/outbox-worker';
import { enqueueMail } from '../../server/services/mail/outbox';
import { createMailer, sendDueMail } from '../../server/services/mail/sender';
import { anonymousAgent, DEMO, signedInAgent, startTestApp, uniqueEmail } from '../support/app';
import { insertPedal, placeOrder } from './orders-fixtures';

let mail: MailFake;
let t: ReturnType<typeof startTestApp>;

beforeAll(async () => {
  mail = await startMailFake({ smtpPort: 0, httpPort: 0 });
  t = startTestApp({ SMTP_PORT: String(mail.smtpPort), MAIL_INBOX_URL: mail.httpUrl, OUTBOX_RETRY_BASE_SECONDS: '2', OUTBOX_POLL_SECONDS: '0.5' });
});
let smtpDown = false;
// A failed test must not leave the mail server down for the next one.
afterEach(async () => {
  if (smtpDown) await mail.startSmtp();
  smtpDown = false;
});
afterAll(async () => {
  await mail?.close();
  await t?.stop();
});

type Summary = { id: string; subject: string; to: string[]; attachmentCount: number };
const inboxFor = async (to: string) => (await (await fetch(`${mail.httpUrl}/messages?to=${encodeURIComponent(to)}`)).json()) as Summary[];
const outboxRow = (key: string) => t.knex('outbox').where({ dedupe_key: key }).first();

async function waitFor<T>(check: () => Promise<T | false | undefined>, what: string, ms = 15_000): Promise<T> {
  const until = Date.now() + ms;
  for (;;) {
    const v = await check();
    if (v) return v;
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

describe('the mail outbox', () => {
  it('queues the welcome mail with the new account, in the same transaction', async () => {
    const anon = await anonymousAgent(t.app);
    const email = uniqueEmail('welcome');
    await anon.post('/api/auth/register').set('X-CSRF-Token', anon.csrf).send({ name: 'Ines Falk', email, password: 'a long enough password' }).expect(202);
    const user = await t.knex('users').where({ email }).first('id');
    const row = await outboxRow(`welcome:${user.id}`);
    expect(row).toMatchObject({ template: 'welcome', to_address: email, status: 'pending' });
    // The same address again: no second account and no second welcome, but its owner hears of it.
    const again = await anonymousAgent(t.app);
    await again.post('/api/auth/register').set('X-CSRF-Token', again.csrf).send({ name: 'Ines Falk', email, password: 'a long enough password' }).expect(202);
    expect((await t.knex('outbox').where({ to_address: email })).map((m) => m.template).sort()).toEqual(['account-exists', 'welcome']);
  });

  it('keeps mail while SMTP is down and sends it once, through a worker loop, when it returns', async () => {
    const customer = await signedInAgent(t.app, DEMO.customer);
    const pedal = await insertPedal(t.knex);
    const { order } = await placeOrder(customer, pedal, 2, 'led');
    const to = uniqueEmail('receipt');
    const key = `order-received:test-${order.id}`;
    const mailer = createMailer(t.config);
    // Whatever earlier tests queued goes out first, so this test watches only its own mail.
    await sendDueMail(t.knex, mailer, t.config, 100);
    await mail.stopSmtp();
    smtpDown = true;
    await t.knex.transaction(async (trx) => {
      expect(await enqueueMail(trx, { dedupeKey: key, template: 'order-received', to, data: { customerName: 'Dee Castellano', orderNumber: order.number, lines: [{ description: 'Test Drive — Red LED pair', quantity: 2, unitPriceCents: 19_100, lineTotalCents: 38_200 }], subtotalCents: 38_200, shippingCents: 900, taxCents: 6_243, totalCents: 39_100, pricesIncludeTax: true, orderUrl: 'http://127.0.0.1/orders/1' } })).toBe(true);
      // The same event queued again is ignored: one mail per event.
      expect(await enqueueMail(trx, { dedupeKey: key, template: 'order-received', to, data: {} })).toBe(false);
    });

    const down = await sendDueMail(t.knex, mailer, t.config);
    expect(down.failed).toBe(1);
    const waiting = await outboxRow(key);
    expect(waiting).toMatchObject({ status: 'pending', attempts: 1 });
    expect(waiting.last_error).toBeTruthy();
    expect(waiting.next_attempt_at.getTime()).toBeGreaterThan(Date.now() - 1_000);
    expect(await inboxFor(to)).toEqual([]);
    expect(await sendDueMail(t.knex, mailer, t.config)).toEqual({ sent: 0, failed: 0 }); // not due yet: backoff

    await mail.startSmtp();
    smtpDown = false;
    const jobs = await startJobs(t.config, [outboxJob(t.knex, t.config, mailer)]);
    try {
      const sent = await waitFor(async () => { const r = await outboxRow(key); return r.status === 'sent' && r; }, 'the worker to send');
      expect(sent.attempts).toBe(2);
      const messages = await waitFor(async () => { const m = await inboxFor(to); return m.length > 0 && m; }, 'the message in the inbox');
      expect(messages).toHaveLength(1);
      expect(messages[0].subject).toBe(`Receipt for order ${order.number}`);
      const full = await (await fetch(`${mail.httpUrl}/messages/${messages[0].id}`)).json();
      expect(full.text).toContain('2 × Test Drive — Red LED pair at €191.00 = €382.00');
      expect(full.text).toContain('Total:    €391.00');
      expect(full.html).toContain('Hollowmere Effects');
      expect(full.html).toContain('€382.00');
    } finally {
      await jobs.stop();
    }
    // Another sweep finds nothing to do: the mail is never sent twice.
    expect(await sendDueMail(t.knex, mailer, t.config)).toEqual({ sent: 0, failed: 0 });
    expect(await inboxFor(to)).toHaveLength(1);
  });

  it('never sends a row twice when two sweeps run at once', async () => {
    const to = uniqueEmail('race');
    for (let i = 0; i < 6; i++) await enqueueMail(t.knex, { dedupeKey: `welcome:race-${to}-${i}`, template: 'welcome', to, data: { name: `Racer ${i}` } });
    const mailer = createMailer(t.config);
    const [a, b] = await Promise.all([sendDueMail(t.knex, mailer, t.config), sendDueMail(t.knex, mailer, t.config)]);
    expect(a.sent + b.sent).toBe(6);
    expect(await waitFor(async () => { const m = await inboxFor(to); return m.length >= 6 && m; }, 'six messages')).toHaveLength(6);
  });

  it('attaches stored files by id, escapes data in HTML, and the staff inbox API shows the message', async () => {
    const pdf = Buffer.from('%PDF-1.4\n% test spec sheet\n');
    const [file] = await t.knex('files').insert({ purpose: 'spec-sheet', filename: 'HM-TEST-0001.pdf', content_type: 'application/pdf', size_bytes: pdf.length, data: pdf }).returning('id');
    const to = uniqueEmail('passed');
    await enqueueMail(t.knex, {
      dedupeKey: `unit-passed:test-${file.id}`, template: 'unit-passed', to,
      data: { customerName: '<b>Dee</b>', orderNumber: 'HM-10001', serial: 'HM-TEST-0001', description: 'Test Drive — Red LED pair', hasSpecSheet: true, orderUrl: 'http://127.0.0.1/orders/1' },
      attachments: [{ filename: 'HM-TEST-0001.pdf', fileId: file.id }],
    });
    await sendDueMail(t.knex, createMailer(t.config), t.config);
    const [summary] = await waitFor(async () => { const m = await inboxFor(to); return m.length > 0 && m; }, 'the passed mail');
    expect(summary.attachmentCount).toBe(1);

    const owner = await signedInAgent(t.app, DEMO.owner);
    const detail = await owner.get(`/api/mail/messages/${summary.id}`).expect(200);
    expect(detail.body.message.html).toContain('&lt;b&gt;Dee&lt;/b&gt;');
    expect(detail.body.message.text).toContain('spec sheet');
    expect(detail.body.message.attachments[0]).toMatchObject({ filename: 'HM-TEST-0001.pdf', contentType: 'application/pdf' });
    const bytes = await owner.get(`/api/mail/messages/${summary.id}/attachments/0`).buffer(true).expect(200);
    expect(Buffer.compare(bytes.body as Buffer, pdf)).toBe(0);
    const list = await owner.get('/api/mail/messages').expect(200);
    expect(list.body.messages.some((m: Summary) => m.id === summary.id)).toBe(true);
    await owner.get('/api/mail/messages/no-such-id').expect(404);
    const customer = await signedInAgent(t.app, DEMO.customer);
    await customer.get('/api/mail/messages').expect(403);
  });

  it('counts a failed render as an attempt with its reason instead of sending an empty mail', async () => {
    const to = uniqueEmail('typo');
    await enqueueMail(t.knex, { dedupeKey: `typo:${to}`, template: 'order-recieved', to, data: {} });
    await sendDueMail(t.knex, createMailer(t.config), t.config);
    const row = await outboxRow(`typo:${to}`);
    expect(row.status).toBe('pending');
    expect(row.last_error).toMatch(/Unknown mail template "order-recieved"/);
    expect(await inboxFor(to)).toEqual([]);
    await t.knex('outbox').where({ id: row.id }).update({ status: 'failed' });
  });
});
