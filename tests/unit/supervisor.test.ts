// The supervisor of `npm start` (scripts/supervisor.mjs) on a real child process that keeps dying:
// its restart delay doubles up to the cap, and stop() ends a running child and waits for it.
import { describe, expect, it } from 'vitest';
import { supervise } from '../../scripts/supervisor.mjs';

const node = process.execPath;

describe('supervise', () => {
  it('restarts a program that exits, doubling the delay up to the cap', async () => {
    const lines: string[] = [];
    const program = supervise({ name: 'quitter', command: node, args: ['-e', 'process.exit(3)'], stdio: 'ignore', log: (l) => lines.push(l), minDelayMs: 100, maxDelayMs: 400 });
    const deadline = Date.now() + 60_000;
    while (lines.length < 4 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 50));
    await program.stop();
    expect(lines.slice(0, 4)).toEqual([
      'quitter exited (code 3); restarting in 0.1 s',
      'quitter exited (code 3); restarting in 0.2 s',
      'quitter exited (code 3); restarting in 0.4 s',
      'quitter exited (code 3); restarting in 0.4 s',
    ]);
    const starts = program.starts;
    await new Promise((r) => setTimeout(r, 600));
    expect(program.starts).toBe(starts); // stopped: no more restarts
  }, 90_000);

  it('stops a running program with SIGTERM and resolves once it has exited', async () => {
    const lines: string[] = [];
    // Exits 0 on SIGTERM after a short clean-up, as the web and worker processes do.
    const script = "process.on('SIGTERM', () => setTimeout(() => process.exit(0), 200)); setInterval(() => {}, 1000); console.log('up')";
    const program = supervise({ name: 'sleeper', command: node, args: ['-e', script], stdio: 'ignore', log: (l) => lines.push(l) });
    const pid = program.pid!;
    await new Promise((r) => setTimeout(r, 1500));
    await program.stop(10_000);
    expect(program.pid).toBeUndefined();
    expect(() => process.kill(pid, 0)).toThrow();
    expect(lines).toEqual([]); // no restart, no forced kill
  }, 30_000);
});
