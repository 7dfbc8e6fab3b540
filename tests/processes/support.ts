// Helpers for the tests that run Kneepoint as real processes (node --import tsx scripts/serve.ts),
// on free ports, against the test database `npm test` prepared. Every child is killed in afterAll.
import { spawn, type ChildProcess } from 'node:child_process';
import { closeSync, mkdtempSync, openSync, readFileSync } from 'node:fs';
import { createServer, type AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
const children = new Set<ChildProcess>();
export const logDir = mkdtempSync(path.join(tmpdir(), 'kneepoint-processes-'));

/** A port nobody listens on right now (the OS picks it). */
export async function freePort(): Promise<number> {
  const probe = createServer();
  await new Promise<void>((resolve) => probe.listen(0, '127.0.0.1', resolve));
  const { port } = probe.address() as AddressInfo;
  await new Promise((resolve) => probe.close(resolve));
  return port;
}

/** Polls `check` until it returns something truthy; throws naming `what` after `timeoutMs`. */
export async function waitFor<T>(what: string, check: () => Promise<T | false | null | undefined>, timeoutMs: number, everyMs = 100): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await check().catch(() => null);
    if (value) return value;
    if (Date.now() > deadline) throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}`);
    await new Promise((resolve) => setTimeout(resolve, everyMs));
  }
}

/** The environment of a child process: the test database and configuration, plus `extra`. */
export function childEnv(extra: Record<string, string> = {}): NodeJS.ProcessEnv {
  if (!process.env.DATABASE_URL) throw new Error('DATABASE_URL is not set: run the tests through `npm test`.');
  return { ...process.env, NODE_ENV: 'test', SESSION_SECRET: 'test-secret-not-for-production', HOST: '127.0.0.1', ...extra };
}

/** Starts one Kneepoint process in `role`, its output in a log file of its own. */
export function startRole(role: 'web' | 'worker', name: string, extra: Record<string, string> = {}) {
  const log = path.join(logDir, `${name}.log`);
  const fd = openSync(log, 'a');
  const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/serve.ts', role], { cwd: ROOT, env: childEnv(extra), stdio: ['ignore', fd, fd] });
  closeSync(fd);
  children.add(child);
  child.once('exit', () => children.delete(child));
  return { child, log, output: () => readFileSync(log, 'utf8') };
}

/** The line a worker process prints once its jobs run (scripts/serve.ts). */
export const WORKER_READY = 'is running the background jobs';

/**
 * Waits until a started process has printed `text`; fails at once, with the end of its log, if the
 * process exits first (a crash at start must not look like a slow machine).
 */
export async function printed(started: ReturnType<typeof startRole>, text: string, timeoutMs: number) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const output = started.output();
    if (output.includes(text)) return;
    const { exitCode, signalCode } = started.child;
    if (exitCode !== null || signalCode !== null || Date.now() > deadline) {
      const why = exitCode !== null || signalCode !== null ? `exited (${exitCode ?? signalCode})` : `timed out after ${timeoutMs} ms`;
      throw new Error(`${path.basename(started.log)} ${why} before printing "${text}"; its log ends:\n${output.slice(-2000)}`);
    }
    await new Promise((resolve) => setTimeout(resolve, 200));
  }
}

/** Waits for a web process to answer /api/health. */
export async function webReady(baseUrl: string, timeoutMs = 60_000) {
  await waitFor(`${baseUrl} to answer`, async () => (await fetch(`${baseUrl}/api/health`)).ok, timeoutMs, 200);
}

/** Waits until the child has exited (after a kill). */
export function exited(child: ChildProcess) {
  return child.exitCode !== null || child.signalCode !== null
    ? Promise.resolve()
    : new Promise<void>((resolve) => child.once('exit', () => resolve()));
}

/** Kills every child still running (afterAll). */
export async function killChildren() {
  const running = [...children];
  for (const child of running) child.kill('SIGKILL');
  await Promise.all(running.map(exited));
}

/** A cookie-keeping client of one web process, with its CSRF token (a minimal browser). */
export class Client {
  cookie = '';
  csrf = '';
  constructor(public baseUrl: string) {}

  /** Uses another web process with the same cookies (a load balancer sending the next request elsewhere). */
  via(baseUrl: string) {
    const other = new Client(baseUrl);
    other.cookie = this.cookie;
    other.csrf = this.csrf;
    return other;
  }

  async request(method: string, url: string, body?: unknown) {
    const res = await fetch(this.baseUrl + url, {
      method,
      headers: { 'content-type': 'application/json', ...(this.cookie ? { cookie: this.cookie } : {}), ...(this.csrf ? { 'x-csrf-token': this.csrf } : {}) },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    const setCookie = res.headers.getSetCookie().map((c) => c.split(';')[0]);
    if (setCookie.length > 0) this.cookie = setCookie.join('; ');
    const text = await res.text();
    const json = text ? JSON.parse(text) : null;
    if (json?.csrfToken) this.csrf = json.csrfToken;
    return { status: res.status, body: json };
  }

  async signIn(email: string, password: string) {
    await this.request('GET', '/api/auth/csrf');
    return this.request('POST', '/api/auth/login', { email, password });
  }
}
