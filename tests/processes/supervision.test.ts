// `npm start`'s supervision, run for real: the same stack bootstrap.mjs starts (web, worker, payments
// and mail fakes as separate processes), on free ports and the test database. A child killed with
// SIGKILL comes back on its own while the app keeps answering; a stop ends every child cleanly.
import { closeSync, openSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { startStack } from '../../scripts/stack.mjs';
import { childEnv, freePort, logDir, ROOT, waitFor } from './support';

const logFile = path.join(logDir, 'stack.log');
const supervisorLog: string[] = [];
let stack: ReturnType<typeof startStack> | null = null;
let fd: number | null = null; // kept open: restarted children write to it too

afterAll(async () => {
  await stack?.stop(5_000);
  if (fd !== null) closeSync(fd);
});

async function answers(url: string) {
  try {
    return (await fetch(url)).ok;
  } catch {
    return false;
  }
}

describe('npm start supervision', () => {
  it('restarts a killed fake or worker with backoff while the web process keeps answering, then stops cleanly', async () => {
    const env = childEnv({
      PORT: String(await freePort()), PAYMENTS_PORT: String(await freePort()), SMTP_PORT: String(await freePort()),
      MAIL_FAKE_HTTP_PORT: String(await freePort()),
    });
    fd = openSync(logFile, 'a');
    stack = startStack({ root: ROOT, env, fakes: true, log: (line) => supervisorLog.push(line), stdio: ['ignore', fd, fd, 'ipc'] });
    const { ports, programs } = stack;
    const health = `http://127.0.0.1:${ports.app}/api/health`;
    const mailHealth = `http://127.0.0.1:${ports.mailHttp}/health`;
    await waitFor('the web process', () => answers(health), 180_000, 200);
    await waitFor('the mail fake', () => answers(mailHealth), 180_000, 200);
    // The web process got the fakes' ports from configuration, not the defaults.
    expect(readFileSync(logFile, 'utf8')).toContain(`SMTP on 127.0.0.1:${ports.smtp}`);

    const mail = programs['mail fake'];
    const killedPid = mail.pid!;
    process.kill(killedPid, 'SIGKILL');
    // While the fake is down and coming back, every health check of the app answers 200.
    const checks: boolean[] = [];
    await waitFor('the mail fake to come back', async () => {
      checks.push(await answers(health));
      return mail.pid !== undefined && mail.pid !== killedPid && (await answers(mailHealth));
    }, 20_000, 100);
    expect(checks.length).toBeGreaterThan(0);
    expect(checks.every(Boolean)).toBe(true);
    expect(mail.starts).toBe(2);
    await waitFor('the new fake to report its ports', async () => readFileSync(logFile, 'utf8').split(`SMTP on 127.0.0.1:${ports.smtp}`).length === 3, 10_000);
    expect(supervisorLog).toContain('mail fake exited (signal SIGKILL); restarting in 0.5 s');

    // A worker killed mid-whatever is replaced too, and the app never noticed.
    const worker = programs.worker;
    const workerPid = worker.pid!;
    process.kill(workerPid, 'SIGKILL');
    await waitFor('a new worker', async () => worker.pid !== undefined && worker.pid !== workerPid, 20_000);
    expect(await answers(health)).toBe(true);
    expect(supervisorLog).toContain('worker exited (signal SIGKILL); restarting in 0.5 s');

    // Stop: every child exits by itself (none needs SIGKILL) and none prints an error.
    const current = stack;
    stack = null;
    await current.stop(20_000);
    expect(Object.values(programs).map((p) => p.pid)).toEqual([undefined, undefined, undefined, undefined]);
    expect(supervisorLog.filter((line) => /did not stop/.test(line))).toEqual([]);
    expect(await answers(health)).toBe(false);
    const output = readFileSync(logFile, 'utf8');
    expect(output.split('\n').filter((line) => /error|more than once|\bat \S+ \(/i.test(line))).toEqual([]);
  }, 360_000);
});
