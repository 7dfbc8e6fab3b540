import type { Knex } from 'knex';
import { isRetryable } from './pg-errors';

/**
 * Runs `fn` in a transaction and runs the WHOLE transaction again (up to `attempts` times in all)
 * when PostgreSQL aborts it as a deadlock victim (40P01) or a serialization failure (40001): the
 * rolled-back attempt wrote nothing, so a fresh one is safe. `fn` must not have effects outside
 * the transaction (provider calls, mail sending) — queue those in the transaction instead. After the
 * last attempt the error goes on to the error middleware, which answers 503 "try again".
 */
export async function withTransactionRetry<T>(knex: Knex, fn: (trx: Knex.Transaction) => Promise<T>, attempts = 3): Promise<T> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await knex.transaction(fn);
    } catch (error) {
      if (!isRetryable(error) || attempt >= attempts) throw error;
      // A short random pause so the two transactions that collided do not collide again in step.
      await new Promise((resolve) => setTimeout(resolve, 10 + Math.random() * 40 * attempt));
    }
  }
}
