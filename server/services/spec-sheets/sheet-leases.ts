// Who works a sheet job. A worker claims a job with a fresh lease token and renews the job's
// heartbeat every few seconds while it runs; a job whose heartbeat has been quiet for
// STALE_AFTER_SECONDS belongs to a dead worker and another one claims it with a new token. Every
// write of a unit's result checks the token under the job's row lock, so a worker that was only
// slow (not dead) finds its lease gone and stops instead of doing units a second time.
import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import { wakeJob } from '../../jobs/wake';

/** The worker loop that runs sheet jobs (server/jobs/spec-sheets.ts). */
export const SHEET_JOBS_LOOP = 'spec-sheet-jobs';
/** A running job whose heartbeat is older than this is taken over by another worker. */
export const STALE_AFTER_SECONDS = 20;
/** How often a running job renews its heartbeat (well inside STALE_AFTER_SECONDS). */
export const HEARTBEAT_SECONDS = 4;

/** Takes the oldest queued job (or one whose worker went quiet) under a new lease; null when there is none. */
export async function claimSheetJob(knex: Knex) {
  const lease = randomUUID();
  const { rows } = await knex.raw(
    `UPDATE sheet_jobs SET state = 'running', lease_token = ?, started_at = COALESCE(started_at, now()), heartbeat_at = now()
     WHERE id = (SELECT id FROM sheet_jobs
                 WHERE state = 'queued' OR (state = 'running' AND (heartbeat_at IS NULL OR heartbeat_at < now() - make_interval(secs => ?)))
                 ORDER BY id FOR UPDATE SKIP LOCKED LIMIT 1)
     RETURNING id, batch_id`,
    [lease, STALE_AFTER_SECONDS],
  );
  const row = rows[0] as { id: number; batch_id: number } | undefined;
  return row ? { ...row, lease } : null;
}

/** Runs `work` in a transaction only while `lease` still holds the job; false when it was taken over. */
export async function whileLeased(knex: Knex, jobId: number, lease: string, work: (trx: Knex.Transaction) => Promise<unknown>) {
  return knex.transaction(async (trx) => {
    const held = await trx('sheet_jobs').where({ id: jobId, lease_token: lease, state: 'running' }).forUpdate().first('id');
    if (!held) return false;
    await work(trx);
    return true;
  });
}

/** Renews the heartbeat on a timer, so a unit that takes long does not look like a dead worker. */
export function keepLease(knex: Knex, jobId: number, lease: string) {
  return setInterval(() => {
    knex('sheet_jobs').where({ id: jobId, lease_token: lease }).update({ heartbeat_at: knex.fn.now() })
      .catch((error) => console.error('[spec-sheets] heartbeat of job', jobId, error));
  }, HEARTBEAT_SECONDS * 1000);
}

/** Gives a job back (progress kept) when its worker stops, and wakes another worker to carry on. */
export async function releaseLease(knex: Knex, jobId: number, lease: string) {
  await knex.transaction(async (trx) => {
    const released = await trx('sheet_jobs').where({ id: jobId, lease_token: lease }).update({ state: 'queued', lease_token: null, heartbeat_at: null });
    if (released) await wakeJob(trx, SHEET_JOBS_LOOP);
  });
}
