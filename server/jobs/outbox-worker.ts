import type { Knex } from 'knex';
import type { Transporter } from 'nodemailer';
import type { Config } from '../config';
import { createMailer, sendDueMail } from '../services/mail/sender';
import type { JobDefinition } from './boss';

export const OUTBOX_QUEUE = 'mail-outbox';

/**
 * The outbox sweep as a pg-boss job. Each run sends what is due and queues the next run a few
 * seconds later; the queue is 'stately', so however many servers run this there is one sweep
 * waiting and one running at a time. A cron line each minute restarts the chain should it stop.
 */
export function outboxJob(knex: Knex, config: Config, mailer: Transporter = createMailer(config)): JobDefinition {
  return {
    name: OUTBOX_QUEUE,
    policy: 'stately',
    cron: '* * * * *',
    pollingIntervalSeconds: Math.max(0.5, Math.min(config.OUTBOX_POLL_SECONDS, 2)),
    handler: async (boss) => {
      try {
        await sendDueMail(knex, mailer, config);
      } finally {
        await boss.sendAfter(OUTBOX_QUEUE, {}, {}, config.OUTBOX_POLL_SECONDS);
      }
    },
  };
}

/** Starts the chain right away instead of waiting for the first cron tick. */
export async function kickOutbox(boss: { send: (name: string, data: object) => Promise<string | null> }) {
  await boss.send(OUTBOX_QUEUE, {});
}
