// A batch's sheets as one background job. The request is a sheet_jobs row (written here, in the
// request's transaction); the pg-boss worker (server/jobs/spec-sheets.ts) claims it, writes its
// progress back row by row, and stores the finished zip in `files`. So progress survives a page
// reload, any server instance can report it, and a worker that dies mid-way is replaced.
import type { Knex } from 'knex';
import type { SessionUser } from '../../../shared/roles';
import { batchLabel } from '../../../shared/production/serials';
import { conflict, notFound } from '../../errors';
import type { SheetJobView } from '../../../shared/schemas/spec-sheets';
import { defaultPublicUrl } from './assemble';
import { renderUnitSheet, storeSheetForPassedUnit, storesSheet } from './sheets';
import { compute } from '../../compute/pool';

export { zipArchive } from './zip';

/** A running job whose heartbeat is older than this is taken over by another worker. */
export const STALE_AFTER_SECONDS = 120;

export type { SheetJobView };

interface SheetJobRow {
  id: number; batch_id: number; state: SheetJobView['state']; total: number; done: number; failures: Record<string, string> | null;
  archive_file_id: number | null; error: string | null; created_at: Date; finished_at: Date | null;
}

function view(row: SheetJobRow): SheetJobView {
  const failures = row.failures ?? {};
  return {
    id: row.id, batchId: row.batch_id, state: row.state, total: row.total, done: row.done,
    failures: Object.entries(failures).map(([serial, reason]) => ({ serial, reason })),
    archiveReady: row.archive_file_id !== null, error: row.error ?? null,
    createdAt: new Date(row.created_at).toISOString(), finishedAt: row.finished_at ? new Date(row.finished_at).toISOString() : null,
  };
}

const liveUnits = (db: Knex | Knex.Transaction, batchId: number) => db('units').where({ batch_id: batchId }).whereNot('state', 'cancelled');

/** Queues the sheets of a batch; a job already waiting or running for it is returned instead of a second one. */
export async function requestBatchSheets(knex: Knex, user: SessionUser, batchId: number) {
  return knex.transaction(async (trx) => {
    const batch = await trx('batches').where({ id: batchId }).forUpdate().first('id', 'number');
    if (!batch) throw notFound('No such batch');
    const count = await liveUnits(trx, batchId).count({ n: '*' }).first();
    const total = Number(count?.n ?? 0);
    if (total === 0) throw conflict(`Batch ${batchLabel(batch.number)} has no units yet: release it first`);
    const open = await trx('sheet_jobs').where({ batch_id: batchId }).whereIn('state', ['queued', 'running']).first();
    if (open) return { job: view(open), created: false };
    const [row] = await trx('sheet_jobs').insert({ batch_id: batchId, total, requested_by: user.id }).returning('*');
    return { job: view(row), created: true };
  });
}

export async function sheetJob(knex: Knex, jobId: number) {
  const row = await knex('sheet_jobs').where({ id: jobId }).first();
  if (!row) throw notFound('No such spec sheet job');
  return view(row);
}

/** The batch's most recent job (or null), so a page that reloads finds its progress bar again. */
export async function latestBatchJob(knex: Knex, batchId: number) {
  const batch = await knex('batches').where({ id: batchId }).first('id');
  if (!batch) throw notFound('No such batch');
  const row = await knex('sheet_jobs').where({ batch_id: batchId }).orderBy('id', 'desc').first();
  return row ? view(row) : null;
}

export async function jobArchive(knex: Knex, jobId: number) {
  const row = await knex('sheet_jobs as j').join('batches as b', 'b.id', 'j.batch_id').leftJoin('files as f', 'f.id', 'j.archive_file_id')
    .where('j.id', jobId).first('j.id', 'b.number', 'f.data');
  if (!row) throw notFound('No such spec sheet job');
  if (!row.data) throw conflict('The archive is not ready yet');
  return { filename: `spec-sheets-${batchLabel(row.number)}.zip`, data: row.data as Buffer };
}

/** Takes the oldest queued job (or a stale running one) for this worker; null when there is none. */
export async function claimSheetJob(knex: Knex) {
  const { rows } = await knex.raw(
    `UPDATE sheet_jobs SET state = 'running', done = 0, failures = '{}', started_at = now(), heartbeat_at = now()
     WHERE id = (SELECT id FROM sheet_jobs
                 WHERE state = 'queued' OR (state = 'running' AND heartbeat_at < now() - make_interval(secs => ?))
                 ORDER BY id FOR UPDATE SKIP LOCKED LIMIT 1)
     RETURNING *`,
    [STALE_AFTER_SECONDS],
  );
  return (rows[0] ?? null) as { id: number; batch_id: number } | null;
}

/** One unit's PDF for the archive: its stored sheet, storing it first if it passed, else made on demand. */
async function sheetFor(knex: Knex, unit: { id: number; state: string }, publicUrl: string) {
  if (storesSheet(unit.state)) {
    const fileId = await knex.transaction((trx) => storeSheetForPassedUnit(trx, unit.id, null, publicUrl));
    return (await knex('files').where({ id: fileId }).first('data')).data as Buffer;
  }
  return renderUnitSheet(knex, unit.id, publicUrl);
}

/** Works a claimed job to the end: every unit's sheet (a failure is noted by serial), then the zip. */
export async function runSheetJob(knex: Knex, jobId: number, publicUrl = defaultPublicUrl()) {
  const job = await knex('sheet_jobs as j').join('batches as b', 'b.id', 'j.batch_id').where('j.id', jobId).first('j.*', 'b.number');
  const units = await liveUnits(knex, job.batch_id).orderBy('sequence').select('id', 'serial', 'state', 'updated_at');
  await knex('sheet_jobs').where({ id: jobId }).update({ total: units.length, heartbeat_at: knex.fn.now() });
  const entries: { name: string; data: Buffer; date: Date }[] = [];
  const failures: Record<string, string> = {};
  try {
    for (const [i, unit] of units.entries()) {
      try {
        entries.push({ name: `${unit.serial}.pdf`, data: await sheetFor(knex, unit, publicUrl), date: new Date(unit.updated_at) });
      } catch (error) {
        failures[unit.serial] = error instanceof Error ? error.message.slice(0, 300) : String(error);
      }
      await knex('sheet_jobs').where({ id: jobId }).update({ done: i + 1, failures: JSON.stringify(failures), heartbeat_at: knex.fn.now() });
    }
    const failed = Object.entries(failures);
    if (failed.length > 0) {
      const note = `These units of ${batchLabel(job.number)} have no sheet in this archive:\n${failed.map(([s, r]) => `${s}: ${r}`).join('\n')}\n`;
      entries.push({ name: 'units-without-a-sheet.txt', data: Buffer.from(note, 'utf8'), date: new Date() });
    }
    // Zipping ~10 MB (deflate and CRCs) runs in the compute pool too, not on this event loop.
    const data = await compute.zipArchive(entries);
    await knex.transaction(async (trx) => {
      const [file] = await trx('files').insert({
        purpose: 'archive', filename: `spec-sheets-${batchLabel(job.number)}.zip`, content_type: 'application/zip',
        size_bytes: data.length, data, uploaded_by: job.requested_by,
      }).returning('id');
      await trx('sheet_jobs').where({ id: jobId }).update({ state: 'finished', archive_file_id: file.id, finished_at: trx.fn.now(), heartbeat_at: trx.fn.now() });
    });
  } catch (error) {
    await knex('sheet_jobs').where({ id: jobId }).update({ state: 'failed', error: error instanceof Error ? error.message.slice(0, 500) : String(error), finished_at: knex.fn.now() });
    throw error;
  }
}

/** Claims and works jobs until none is waiting; returns how many it ran. */
export async function runQueuedSheetJobs(knex: Knex, publicUrl?: string) {
  let ran = 0;
  for (let job = await claimSheetJob(knex); job; job = await claimSheetJob(knex)) {
    await runSheetJob(knex, job.id, publicUrl).catch((error) => console.error('[spec-sheets] job', job!.id, error));
    ran++;
  }
  return ran;
}
