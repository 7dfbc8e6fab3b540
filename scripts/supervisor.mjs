// Keeps the programs of `npm start` running. Node built-ins only: bootstrap.mjs imports it before
// npm packages may exist. A program that exits on its own is started again after a delay that
// doubles from half a second up to 30 s and falls back to half a second once the program has
// stayed up a minute, so a crash loop does not spin while a one-off crash costs half a second.
// Stopping sends SIGTERM, waits for the program to exit (it drains its own work), and only then
// resolves, so the caller can stop PostgreSQL knowing nobody still uses it.
import { spawn } from 'node:child_process';

const MIN_DELAY_MS = 500;
const MAX_DELAY_MS = 30_000;
const STABLE_AFTER_MS = 60_000;

const seconds = (ms) => `${ms % 1000 === 0 ? ms / 1000 : (ms / 1000).toFixed(1)} s`;

/**
 * Runs one program under supervision.
 * @param {{ name: string, command: string, args?: string[], cwd?: string, env?: NodeJS.ProcessEnv,
 *   stdio?: import('node:child_process').StdioOptions, detached?: boolean, log?: (line: string) => void,
 *   minDelayMs?: number, maxDelayMs?: number, stableAfterMs?: number }} program
 */
export function supervise(program) {
  const { name, command, args = [], cwd, env, stdio = 'inherit', detached = false, log = () => {} } = program;
  const minDelay = program.minDelayMs ?? MIN_DELAY_MS;
  const maxDelay = program.maxDelayMs ?? MAX_DELAY_MS;
  const stableAfter = program.stableAfterMs ?? STABLE_AFTER_MS;
  let child = null;
  let exited = Promise.resolve();
  let delay = minDelay;
  let timer = null;
  let stopping = false;
  let starts = 0;

  const onExit = (startedAt, code, signal) => {
    child = null;
    if (stopping) return;
    if (Date.now() - startedAt >= stableAfter) delay = minDelay;
    const how = code !== null && code !== undefined ? `code ${code}` : `signal ${signal}`;
    log(`${name} exited (${how}); restarting in ${seconds(delay)}`);
    timer = setTimeout(start, delay);
    delay = Math.min(delay * 2, maxDelay);
  };

  function start() {
    timer = null;
    const startedAt = Date.now();
    starts++;
    const current = spawn(command, args, { cwd, env, stdio, detached });
    child = current;
    exited = new Promise((resolve) => {
      let done = false;
      const finish = (code, signal) => {
        if (done) return;
        done = true;
        onExit(startedAt, code, signal);
        resolve();
      };
      current.once('exit', finish);
      // A program that cannot be spawned at all (missing file) emits only 'error'.
      current.once('error', (error) => {
        log(`${name} could not start: ${error.message}`);
        finish(null, 'spawn-error');
      });
    });
  }

  start();

  return {
    name,
    /** The running process id, or undefined while waiting to restart. */
    get pid() {
      return child?.pid;
    },
    /** How many times the program was started (1 + restarts). */
    get starts() {
      return starts;
    },
    /** SIGTERM, then SIGKILL if it has not exited after `graceMs`; resolves once it is gone. */
    async stop(graceMs = 20_000) {
      stopping = true;
      if (timer) clearTimeout(timer);
      timer = null;
      const current = child;
      if (!current || current.exitCode !== null || current.signalCode !== null) return;
      current.kill('SIGTERM');
      const killer = setTimeout(() => {
        log(`${name} did not stop within ${seconds(graceMs)}; killing it`);
        current.kill('SIGKILL');
      }, graceMs);
      await exited;
      clearTimeout(killer);
    },
  };
}

/** Stops programs in order, each fully before the next (web before workers before fakes). */
export async function stopInOrder(programs, graceMs) {
  for (const program of programs) await program.stop(graceMs);
}
