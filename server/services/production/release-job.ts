// The background half of a big release (release.ts marks the batch 'releasing'): units are made
// chunk by chunk, each chunk its own transaction, with the event loop free between them.
import type { Knex } from 'knex';
import { releaseStep } from './release';

/** Works every 'releasing' batch to the end; returns how many batches it finished or left with an error. */
export async function runPendingReleases(knex: Knex, chunkUnits: number) {
  const ids: number[] = await knex('batches').where({ state: 'releasing' }).orderBy('id').pluck('id');
  for (const id of ids) {
    try {
      while (await releaseStep(knex, id, chunkUnits)) {
        // Let requests waiting on this process in between two chunks.
        await new Promise((resolve) => setImmediate(resolve));
      }
    } catch (error) {
      // Kept on the batch for the planner; the next run tries again from the units already made.
      const message = error instanceof Error ? error.message.slice(0, 500) : String(error);
      await knex('batches').where({ id }).update({ release_error: message });
      console.error('[release] batch', id, error);
    }
  }
  return ids.length;
}
