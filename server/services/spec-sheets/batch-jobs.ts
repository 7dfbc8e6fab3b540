// A batch's sheets as one background job. The request is a sheet_jobs row (written here, in the
// request's transaction, which wakes the workers); a worker loop (server/jobs/spec-sheets.ts)
// claims it, writes its progress back unit by unit, and stores the finished zip in `files`. So
// progress survives a page reload, any server instance can report it, and a worker that dies
// mid-way is replaced by another that resumes at the next unit (leases: sheet-leases.ts).
import type { Knex } from 'knex';
import type { SessionUser } from '../../../shared/roles';
import { batchLabel } from '../../../shared/production/serials';
import { conflict, notFound } from '../../errors';
import type { SheetJobView } from '../../../shared/schemas/spec-sheets';
import { defaultPublicUrl } from './assemble';
import { claimSheetJob, keepLease, releaseLease, SHEET_JOBS_LOOP, whileLeased } from './sheet-leases';
import { renderUnitSheet, storeSheetForPassedUnit, storesSheet } from './sheets';
import { compute } from '../../compute/pool';
import { wakeJob } from '../../jobs/wake';

export { zipArchive } from './zip';

export { claimSheetJob, SHEET_JOBS_LOOP, STALE_AFTER_SECONDS } from './sheet-leases';

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
    await wakeJob(trx, SHEET_JOBS_LOOP); // delivered on commit: a worker starts at once
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

/** One unit's sheet for the archive: its stored sheet (storing it first if the unit passed), else one made on demand. */
async function sheetFor(knex: Knex, unit: { id: number; state: string }, publicUrl: string) {
  if (storesSheet(unit.state)) {
    return { fileId: await knex.transaction((trx) => storeSheetForPassedUnit(trx, unit.id, null, publicUrl)), pdf: null };
  }
  return { fileId: null, pdf: await renderUnitSheet(knex, unit.id, publicUrl) };
}

/** Works a job claimed with `lease` to the end, skipping units a previous worker already did; stops early when `signal` fires. */
export async function runSheetJob(knex: Knex, jobId: number, lease: string, publicUrl = defaultPublicUrl(), signal?: AbortSignal) {
  const job = await knex('sheet_jobs as j').join('batches as b', 'b.id', 'j.batch_id').where('j.id', jobId).first('j.*', 'b.number');
  const units = await liveUnits(knex, job.batch_id).orderBy('sequence').select('id', 'serial', 'state', 'updated_at');
  const doneIds = new Set<number>((await knex('sheet_job_units').where({ job_id: jobId }).pluck('unit_id')) as number[]);
  let done = units.filter((u) => doneIds.has(u.id)).length;
  if (!(await whileLeased(knex, jobId, lease, (trx) => trx('sheet_jobs').where({ id: jobId }).update({ total: units.length, done })))) return;
  const heartbeat = keepLease(knex, jobId, lease);
  try {
    for (const unit of units) {
      if (doneIds.has(unit.id)) continue;
      if (signal?.aborted) {
        // The worker is stopping: give the job back with its progress so another worker carries on now.
        await releaseLease(knex, jobId, lease);
        return;
      }
      let made: { fileId: number | null; pdf: Buffer | null; failure?: string };
      try {
        made = await sheetFor(knex, unit, publicUrl);
      } catch (error) {
        made = { fileId: null, pdf: null, failure: error instanceof Error ? error.message.slice(0, 300) : String(error) };
      }
      done++;
      const kept = await whileLeased(knex, jobId, lease, async (trx) => {
        await trx('sheet_job_units').insert({ job_id: jobId, unit_id: unit.id, file_id: made.fileId, pdf: made.pdf, failure: made.failure ?? null, lease_token: lease });
        await trx('sheet_jobs').where({ id: jobId }).update({
          done, heartbeat_at: trx.fn.now(),
          failures: made.failure ? trx.raw('failures || ?::jsonb', [JSON.stringify({ [unit.serial]: made.failure })]) : undefined,
        });
      });
      if (!kept) return; // another worker took the job over: it does the rest, this one stops
    }
    await finishJob(knex, jobId, lease, job.number, job.requested_by);
  } catch (error) {
    await knex('sheet_jobs').where({ id: jobId, lease_token: lease })
      .update({ state: 'failed', lease_token: null, error: error instanceof Error ? error.message.slice(0, 500) : String(error), finished_at: knex.fn.now() });
    throw error;
  } finally {
    clearInterval(heartbeat);
  }
}

/** Zips the units' sheets (in batch order) with a note naming those without one, and stores it. */
async function finishJob(knex: Knex, jobId: number, lease: string, batchNumber: number, requestedBy: number | null) {
  const rows = await knex('sheet_job_units as ju').join('units as u', 'u.id', 'ju.unit_id').leftJoin('files as f', 'f.id', 'ju.file_id')
    .where('ju.job_id', jobId).orderBy('u.sequence').select('u.serial', 'u.updated_at', 'u.state', 'ju.failure', 'ju.pdf', 'f.data');
  const entries = rows.filter((r) => !r.failure && r.state !== 'cancelled')
    .map((r) => ({ name: `${r.serial}.pdf`, data: (r.data ?? r.pdf) as Buffer, date: new Date(r.updated_at) }));
  const failed = rows.filter((r) => r.failure);
  if (failed.length > 0) {
    const note = `These units of ${batchLabel(batchNumber)} have no sheet in this archive:\n${failed.map((r) => `${r.serial}: ${r.failure}`).join('\n')}\n`;
    entries.push({ name: 'units-without-a-sheet.txt', data: Buffer.from(note, 'utf8'), date: new Date() });
  }
  // Zipping ~10 MB (deflate and CRCs) runs in the compute pool, not on this event loop.
  const data = await compute.zipArchive(entries);
  await whileLeased(knex, jobId, lease, async (trx) => {
    const [file] = await trx('files').insert({
      purpose: 'archive', filename: `spec-sheets-${batchLabel(batchNumber)}.zip`, content_type: 'application/zip',
      size_bytes: data.length, data, uploaded_by: requestedBy,
    }).returning('id');
    await trx('sheet_jobs').where({ id: jobId }).update({ state: 'finished', lease_token: null, archive_file_id: file.id, finished_at: trx.fn.now(), heartbeat_at: trx.fn.now() });
    // The archive now holds the on-demand sheets; the rows stay as the record of who did which unit.
    await trx('sheet_job_units').where({ job_id: jobId }).update({ pdf: null });
  });
}

/** Claims and works jobs until none is waiting (or the worker stops); returns how many it ran. */
export async function runQueuedSheetJobs(knex: Knex, publicUrl?: string, signal?: AbortSignal) {
  let ran = 0;
  while (!signal?.aborted) {
    const job = await claimSheetJob(knex);
    if (!job) break;
    await runSheetJob(knex, job.id, job.lease, publicUrl, signal).catch((error) => console.error('[spec-sheets] job', job.id, error));
    ran++;
  }
  return ran;
}
