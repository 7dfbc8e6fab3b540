import type { Knex } from 'knex';
import { wakeJob } from '../../jobs/wake';

/** The worker loop that sends the outbox (server/jobs/outbox-worker.ts). */
export const OUTBOX_LOOP = 'mail-outbox';

export type MailAttachment = { filename: string; fileId: number } | { filename: string; invoiceId: number };

export interface OutgoingMail {
  /** One mail per event: a second enqueue with the same key is ignored (e.g. `order-received:42`). */
  dedupeKey: string;
  /** A template name in templates/mail/ (e.g. `order-received`). */
  template: string;
  to: string;
  /** What the template needs; stored as JSON. */
  data: Record<string, unknown>;
  /**
   * Files to attach: by `files.id` (e.g. a unit's stored spec sheet), or an invoice / credit note by
   * `invoices.id`, whose PDF the sender renders (compute pool) when it is not stored yet.
   */
  attachments?: MailAttachment[];
}

/**
 * Data fields that carry a secret (a one-time link): the sender clears them from the stored row as
 * soon as the mail is sent, so the outbox keeps no working link.
 */
export const SECRET_DATA_FIELDS = ['resetUrl'] as const;

/** The row's data as kept after sending: without its secret fields. */
export function withoutSecrets(data: Record<string, unknown>): Record<string, unknown> {
  const kept = { ...data };
  for (const field of SECRET_DATA_FIELDS) if (field in kept) kept[field] = '(removed after sending)';
  return kept;
}

/**
 * Writes a mail to the outbox inside the caller's transaction, so it exists exactly when the
 * change that causes it commits; the outbox worker sends it with retries. Returns true when
 * queued, false when that event's mail was already queued.
 */
export async function enqueueMail(trx: Knex | Knex.Transaction, mail: OutgoingMail): Promise<boolean> {
  const rows = await trx('outbox')
    .insert({
      dedupe_key: mail.dedupeKey,
      template: mail.template,
      to_address: mail.to,
      data: JSON.stringify(mail.data),
      attachments: JSON.stringify(mail.attachments ?? []),
    })
    .onConflict('dedupe_key')
    .ignore()
    .returning('id');
  // Wakes a worker when the caller's transaction commits, so the mail leaves at once rather than at the next sweep.
  if (rows.length > 0) await wakeJob(trx, OUTBOX_LOOP);
  return rows.length > 0;
}
