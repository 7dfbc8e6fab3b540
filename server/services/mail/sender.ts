import nodemailer, { type Transporter } from 'nodemailer';
import type { Knex } from 'knex';
import type { Config } from '../../config';
import { getSettings } from '../settings';
import { withoutSecrets } from './outbox';
import { renderMail } from './render';

/** nodemailer over SMTP: the mail fake in development and tests, a real server in production. */
export function createMailer(config: Config): Transporter {
  return nodemailer.createTransport({
    host: config.SMTP_HOST,
    port: config.SMTP_PORT,
    secure: config.SMTP_SECURE === 'true',
    auth: config.SMTP_USER ? { user: config.SMTP_USER, pass: config.SMTP_PASSWORD ?? '' } : undefined,
    // A mail server that is down should fail the attempt quickly; the outbox retries later.
    connectionTimeout: 5_000,
    greetingTimeout: 5_000,
    socketTimeout: 15_000,
  });
}

interface OutboxRow {
  id: number;
  dedupe_key: string;
  template: string;
  to_address: string;
  data: Record<string, unknown>;
  attachments: { filename: string; fileId: number }[];
  attempts: number;
}

/** Seconds to wait before attempt n+1: doubling from the base, capped at an hour. */
export const backoffSeconds = (attempts: number, base: number) => Math.min(base * 2 ** Math.max(0, attempts - 1), 3600);

/**
 * Sends the outbox mail that is due. Each row is claimed with FOR UPDATE SKIP LOCKED inside its
 * own transaction and marked sent in that same transaction, so two workers (or instances) never
 * send one row twice; a failure counts the attempt and schedules the next with backoff. The
 * Message-ID is derived from the dedupe key, so even a crash between SMTP acceptance and commit
 * yields the same message, which receivers may recognise.
 */
export async function sendDueMail(knex: Knex, mailer: Transporter, config: Config, limit = 20): Promise<{ sent: number; failed: number }> {
  const settings = await getSettings(knex);
  const ctx = { currency: settings.currency, timeZone: settings.time_zone, locale: settings.locale, shopName: settings.shop_name, shopAddress: settings.shop_address };
  const fromAddress = config.MAIL_FROM.match(/<([^>]+)>/)?.[1] ?? config.MAIL_FROM.trim();
  const domain = fromAddress.split('@')[1] ?? 'kneepoint.local';
  let sent = 0;
  let failed = 0;
  for (let i = 0; i < limit; i++) {
    const done = await knex.transaction(async (trx) => {
      const row = (await trx('outbox').where('status', 'pending').andWhere('next_attempt_at', '<=', trx.fn.now())
        .orderBy('id').forUpdate().skipLocked().first()) as OutboxRow | undefined;
      if (!row) return 'none';
      let stage: 'render' | 'send' = 'render';
      try {
        const rendered = renderMail(row.template, { shopUrl: config.publicUrl, ...row.data }, ctx);
        const files = row.attachments.length
          ? await trx('files').whereIn('id', row.attachments.map((a) => a.fileId)).select('id', 'content_type', 'data')
          : [];
        stage = 'send';
        await mailer.sendMail({
          // Sent in the shop's name from the configured mailbox.
          from: { name: settings.shop_name, address: fromAddress },
          to: row.to_address,
          subject: rendered.subject,
          text: rendered.text,
          html: rendered.html,
          messageId: `<${row.dedupe_key.replace(/[^\w.-]/g, '.')}.${row.id}@${domain}>`,
          attachments: row.attachments.map((a) => {
            const file = files.find((f) => f.id === a.fileId);
            if (!file) throw new Error(`Attachment file ${a.fileId} is missing`);
            return { filename: a.filename, content: file.data as Buffer, contentType: file.content_type };
          }),
        });
        await trx('outbox').where({ id: row.id }).update({
          status: 'sent', sent_at: trx.fn.now(), attempts: row.attempts + 1, last_error: null, data: JSON.stringify(withoutSecrets(row.data)),
        });
        return 'sent';
      } catch (error) {
        const attempts = row.attempts + 1;
        const giveUp = attempts >= config.OUTBOX_MAX_ATTEMPTS;
        await trx('outbox').where({ id: row.id }).update({
          attempts,
          status: giveUp ? 'failed' : 'pending',
          last_error: (error instanceof Error ? error.message : String(error)).slice(0, 1000),
          next_attempt_at: trx.raw(`now() + make_interval(secs => ?)`, [backoffSeconds(attempts, config.OUTBOX_RETRY_BASE_SECONDS)]),
        });
        return stage === 'send' ? 'failed' : 'unrenderable';
      }
    });
    if (done === 'none') break;
    if (done === 'sent') sent++;
    else failed++;
    // With the server down every row would fail the same way: stop and let backoff do its work.
    // A mail that cannot be rendered is that row's problem only, so the sweep goes on.
    if (done === 'failed') break;
  }
  return { sent, failed };
}
