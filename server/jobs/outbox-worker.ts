import type { Knex } from 'knex';
import type { Transporter } from 'nodemailer';
import type { Config } from '../config';
import { OUTBOX_LOOP } from '../services/mail/outbox';
import { createMailer, sendDueMail } from '../services/mail/sender';
import type { JobDefinition } from './boss';

/**
 * The outbox sweep as a loop in every worker, woken when mail is queued and run every
 * OUTBOX_POLL_SECONDS for retries: each run sends what is due. Each message is claimed
 * with a row lock (SKIP LOCKED) and marked sent in the same transaction, so several workers share
 * the mail and a worker killed mid-send leaves its message to the next sweep of another worker
 * (its lock goes with its connection) instead of a queue job that stays "active" until it expires.
 */
export function outboxJob(knex: Knex, config: Config, mailer: Transporter = createMailer(config)): JobDefinition {
  return {
    name: OUTBOX_LOOP,
    loop: { everySeconds: config.OUTBOX_POLL_SECONDS },
    handler: async (_boss, { signal }) => {
      if (!signal.aborted) await sendDueMail(knex, mailer, config);
    },
  };
}
