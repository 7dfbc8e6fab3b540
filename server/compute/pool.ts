// The one owner of the compute pool: a piscina worker-thread pool that runs the engine, Monte Carlo
// bands, per-unit predictions, capture analysis and PDF renders (server/compute/tasks.ts) off the
// event loop. Routes, services and jobs call the typed functions below; nothing else starts threads.
import { availableParallelism } from 'node:os';
import Piscina from 'piscina';
import { DomainError } from '../errors';
import * as tasks from './tasks';
import type { Outcome } from './tasks';

type Tasks = typeof tasks;
type TaskName = { [K in keyof Tasks]: Tasks[K] extends (arg: never) => Promise<Outcome<unknown>> ? K : never }[keyof Tasks];
type Arg<K extends TaskName> = Parameters<Tasks[K]>[0];
type Value<K extends TaskName> = Awaited<ReturnType<Tasks[K]>> extends Outcome<infer T> ? T : never;

/** Threads when the configuration names none: one core is left to the event loop and PostgreSQL. */
export const defaultComputeThreads = () => Math.max(1, availableParallelism() - 1);

let threads = defaultComputeThreads();
let pool: Piscina | null = null;

/**
 * Sets the pool's size (COMPUTE_THREADS). 0 runs every task inline on the calling thread, as the
 * product did before the pool: only for measuring the difference (npm run bench -- loop).
 */
export function configureComputePool(size: number | undefined) {
  const next = size ?? defaultComputeThreads();
  if (next === threads) return;
  threads = next;
  const old = pool;
  pool = null;
  void old?.close();
}

function thePool() {
  pool ??= new Piscina({
    filename: new URL('./worker.mjs', import.meta.url).href,
    minThreads: 1,
    maxThreads: threads,
    // Idle threads go after a minute; the first task after that pays the start (~1 s under tsx).
    idleTimeout: 60_000,
    // Bounded queue: past this many waiting tasks the pool refuses rather than growing without end.
    maxQueue: threads * 64,
  });
  return pool;
}

async function run<K extends TaskName>(name: K, arg: Arg<K>): Promise<Value<K>> {
  const result = (threads === 0
    ? await (tasks[name] as (a: Arg<K>) => Promise<Outcome<Value<K>>>)(arg)
    : await thePool().run(arg, { name })) as Outcome<Value<K>>;
  if (!result.ok) throw new DomainError(result.error.status, result.error.code, result.error.message, result.error.fields);
  return result.value;
}

const bytes = (u8: Uint8Array) => Buffer.from(u8.buffer, u8.byteOffset, u8.byteLength);

/** The engine's typed tasks, each run in the pool. */
export const compute = {
  contractProfile: (body: unknown) => run('contractProfile', body),
  sheetBand: (a: Arg<'sheetBand'>) => run('sheetBand', a),
  specSheetProfile: (a: Arg<'specSheetProfile'>) => run('specSheetProfile', a),
  specSheetPdf: async (data: Arg<'specSheetPdf'>) => bytes(await run('specSheetPdf', data)),
  zipArchive: async (entries: Arg<'zipEntries'>) => bytes(await run('zipEntries', entries)),
  packingSlipPdf: async (input: Arg<'packingSlipPdf'>) => bytes(await run('packingSlipPdf', input)),
  invoicePdf: async (input: Arg<'invoicePdf'>) => bytes(await run('invoicePdf', input)),
  addressLabelPdf: async (input: Arg<'addressLabelPdf'>) => bytes(await run('addressLabelPdf', input)),
  serialLabelsPdf: async (input: Arg<'serialLabelsPdf'>) => bytes(await run('serialLabelsPdf', input)),
  wavCapture: (file: Arg<'wavCapture'>) => run('wavCapture', file),
  unitPrediction: (a: Arg<'unitPrediction'>) => run('unitPrediction', a),
  batchMatching: (a: Arg<'batchMatching'>) => run('batchMatching', a),
  /**
   * The option designer's search; when `signal` aborts, the search stops at its next candidate and
   * answers what it has (`cancelled: true`). A shared flag rather than piscina's own abort, which would
   * end the thread and make the next task wait for a new one.
   */
  designSearch: async (body: unknown, signal?: AbortSignal) => {
    const stop = new Int32Array(new SharedArrayBuffer(4));
    const raise = () => Atomics.store(stop, 0, 1);
    if (signal?.aborted) raise();
    signal?.addEventListener('abort', raise, { once: true });
    try {
      return await run('designSearch', { body, stop });
    } finally {
      signal?.removeEventListener('abort', raise);
    }
  },
};

/** Starts the pool's first thread now (a server at start-up), so the first request does not wait for it. */
export function startComputePool() {
  if (threads > 0) thePool();
}

/** What the pool is doing, for the benchmark and logs. */
export function computePoolStats() {
  return { threads, running: pool ? pool.threads.length : 0, queued: pool?.queueSize ?? 0, completed: pool?.completed ?? 0 };
}

/** Ends the pool's threads (a later task starts it again). */
export async function closeComputePool() {
  const old = pool;
  pool = null;
  await old?.close();
}
