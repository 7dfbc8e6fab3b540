// The mail fake, driven by the real nodemailer over SMTP and read back through
// its HTTP API.
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import nodemailer, { type SendMailOptions } from 'nodemailer';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { type MailFake, startMailFake } from '../../server/fakes/mail/index.js';

let fake: MailFake;
const dir = mkdtempSync(join(tmpdir(), 'kneepoint-mail-'));
const file = join(dir, 'mail.json');

// A fresh transport per send: no pooled connection hides a stopped server.
const send = (msg: SendMailOptions) =>
  nodemailer
    .createTransport({ host: '127.0.0.1', port: fake.smtpPort, secure: false, ignoreTLS: true, connectionTimeout: 2_000 })
    .sendMail({ from: 'Kneepoint <shop@kneepoint.test>', ...msg });

const api = async (path: string, init?: RequestInit) => fetch(`${fake.httpUrl}${path}`, init);

beforeAll(async () => {
  fake = await startMailFake({ smtpPort: 0, httpPort: 0, file });
});
afterAll(async () => {
  await fake?.close();
  rmSync(dir, { recursive: true, force: true });
});
beforeEach(async () => {
  expect((await api('/messages', { method: 'DELETE' })).status).toBe(204);
});

describe('mail fake', () => {
  it('stores a message with html, text and an attachment', async () => {
    const pdf = Buffer.from('%PDF-1.4 spec sheet for unit 7\n', 'utf8');
    await send({
      to: 'ada@example.test',
      cc: 'staff@kneepoint.test',
      subject: 'Your order is received',
      text: 'Thanks for your order.',
      html: '<p>Thanks for your <b>order</b>.</p>',
      attachments: [{ filename: 'spec-sheet.pdf', content: pdf, contentType: 'application/pdf' }],
    });

    const list = await (await api('/messages')).json();
    expect(list).toHaveLength(1);
    expect(list[0]).toMatchObject({
      subject: 'Your order is received',
      to: ['ada@example.test'],
      hasHtml: true,
      attachmentCount: 1,
    });
    expect(list[0].from).toContain('shop@kneepoint.test');

    const full = await (await api(`/messages/${list[0].id}`)).json();
    expect(full.text.trim()).toBe('Thanks for your order.');
    expect(full.html).toContain('<b>order</b>');
    expect(full.cc).toEqual(['staff@kneepoint.test']);
    expect(full.envelope.to).toEqual(['ada@example.test', 'staff@kneepoint.test']);
    expect(full.attachments).toEqual([
      expect.objectContaining({ index: 0, filename: 'spec-sheet.pdf', contentType: 'application/pdf', size: pdf.length }),
    ]);
    expect(full.attachments[0].content).toBeUndefined();

    const raw = await api(`/messages/${list[0].id}/attachments/0`);
    expect(raw.status).toBe(200);
    expect(raw.headers.get('content-type')).toContain('application/pdf');
    expect(Buffer.from(await raw.arrayBuffer()).equals(pdf)).toBe(true);

    // Mirrored to the JSON file, content included.
    const saved = JSON.parse(readFileSync(file, 'utf8'));
    expect(saved[0].attachments[0].content).toBe(pdf.toString('base64'));
  });

  it('lists newest first and filters by recipient', async () => {
    await send({ to: 'one@example.test', subject: 'first', text: '1' });
    await send({ to: 'two@example.test', subject: 'second', text: '2' });
    const list = await (await api('/messages')).json();
    expect(list.map((m: { subject: string }) => m.subject)).toEqual(['second', 'first']);
    const onlyOne = await (await api('/messages?to=ONE@example.test')).json();
    expect(onlyOne.map((m: { subject: string }) => m.subject)).toEqual(['first']);
  });

  it('answers 404 for unknown messages and attachments', async () => {
    expect((await api('/messages/nope')).status).toBe(404);
    await send({ to: 'x@example.test', subject: 'no attachments', text: 'x' });
    const [m] = await (await api('/messages')).json();
    expect((await api(`/messages/${m.id}/attachments/0`)).status).toBe(404);
  });

  it('refuses mail while SMTP is stopped and accepts it again after restart', async () => {
    const port = fake.smtpPort;
    await fake.stopSmtp();
    await expect(send({ to: 'late@example.test', subject: 'while down', text: '…' })).rejects.toThrow();
    // The HTTP API stays up meanwhile.
    expect(await (await api('/messages')).json()).toEqual([]);

    await fake.startSmtp();
    expect(fake.smtpPort).toBe(port);
    await send({ to: 'late@example.test', subject: 'after restart', text: 'ok' });
    const list = await (await api('/messages')).json();
    expect(list.map((m: { subject: string }) => m.subject)).toEqual(['after restart']);
  });

  it('keeps earlier mail across a restart of the whole fake when a file is set', async () => {
    await send({ to: 'keep@example.test', subject: 'kept', text: 'k' });
    await fake.close();
    fake = await startMailFake({ smtpPort: 0, httpPort: 0, file });
    const list = await (await api('/messages')).json();
    expect(list.map((m: { subject: string }) => m.subject)).toEqual(['kept']);
  });
});
