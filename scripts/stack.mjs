// The programs `npm start` runs, each under supervision: one web process, one worker process and,
// outside production, the local payments and mail fakes. Node built-ins only (bootstrap.mjs uses
// it before npm packages may exist); the tests start the same stack on free ports.
import path from 'node:path';
import { supervise, stopInOrder } from './supervisor.mjs';

/** Every port of the stack, from the environment (defaults are the documented local ones). */
export function stackPorts(env) {
  const port = (name, fallback) => Number(env[name] ?? fallback);
  return {
    app: port('PORT', 3000),
    payments: port('PAYMENTS_PORT', 3101),
    smtp: port('SMTP_PORT', 3125),
    mailHttp: port('MAIL_FAKE_HTTP_PORT', 3126),
    vite: port('VITE_PORT', 5173),
  };
}

/**
 * Whether to run the local fakes: KP_FAKES=1/0 decides; otherwise they run unless the shell's
 * NODE_ENV is production (a real shop's server talks to the real provider and mail server).
 */
export function fakesWanted(env) {
  if (env.KP_FAKES !== undefined && env.KP_FAKES !== '') return env.KP_FAKES !== '0';
  return env.NODE_ENV !== 'production';
}

/**
 * Starts the stack and returns its programs and a stop() that ends them in order: the vite dev
 * server and web processes first (no new requests, in-flight ones drained), then workers (their
 * current unit finished, the queue stopped), then the fakes the workers may still be sending to.
 * @param {{ root: string, env: NodeJS.ProcessEnv, fakes: boolean, dev?: boolean, workers?: number,
 *   mailFile?: string, log?: (line: string) => void, stdio?: import('node:child_process').StdioOptions }} options
 */
export function startStack({ root, env, fakes, dev = false, workers = 1, mailFile, log = () => {}, stdio = 'inherit' }) {
  const ports = stackPorts(env);
  const appEnv = { ...env, PORT: String(ports.app) };
  const fakeEnv = { ...env };
  if (fakes) {
    Object.assign(appEnv, {
      PAYMENTS_HOST: '127.0.0.1', PAYMENTS_PORT: String(ports.payments), PAYMENTS_PROTOCOL: 'http',
      SMTP_HOST: '127.0.0.1', SMTP_PORT: String(ports.smtp), SMTP_SECURE: 'false',
      MAIL_INBOX_URL: `http://127.0.0.1:${ports.mailHttp}`,
    });
    Object.assign(fakeEnv, {
      PAYMENTS_FAKE_PORT: String(ports.payments),
      WEBHOOK_URL: `http://127.0.0.1:${ports.app}/api/payments/webhook`,
      // The fake signs webhooks with the app's secret (without one it uses its own default).
      ...(env.PAYMENTS_WEBHOOK_SECRET ? { WEBHOOK_SECRET: env.PAYMENTS_WEBHOOK_SECRET } : {}),
      MAIL_FAKE_SMTP_PORT: String(ports.smtp),
      MAIL_FAKE_HTTP_PORT: String(ports.mailHttp),
      MAIL_FILE: mailFile ?? '',
    });
  }
  // `node --import tsx` rather than the tsx wrapper: the supervised pid is then the program itself,
  // so a signal (or a kill -9) reaches it and not a wrapper. Each child runs in its own process
  // group, so a terminal's Ctrl-C reaches only this supervisor, which stops them in order; the IPC
  // channel lets a child notice when the supervisor is gone and stop itself.
  const program = (name, script, programEnv) => supervise({
    name, command: process.execPath, args: ['--import', 'tsx', script], cwd: root, env: programEnv, log,
    stdio: Array.isArray(stdio) ? stdio : [stdio, stdio, stdio, 'ipc'], detached: true,
  });
  const fakePrograms = fakes
    ? [program('payments fake', 'server/fakes/payments/main.ts', fakeEnv), program('mail fake', 'server/fakes/mail/main.ts', fakeEnv)]
    : [];
  const web = [program('web', 'scripts/serve.ts', { ...appEnv, KP_ROLE: 'web' })];
  const workerPrograms = Array.from({ length: workers }, (_, i) =>
    program(workers > 1 ? `worker ${i + 1}` : 'worker', 'scripts/serve.ts', { ...appEnv, KP_ROLE: 'worker' }));
  const front = dev
    ? [supervise({
      name: 'vite', command: path.join(root, 'node_modules', '.bin', 'vite'), args: ['--port', String(ports.vite), '--strictPort'],
      cwd: root, env: appEnv, log, stdio,
    })]
    : [];
  const all = [...front, ...web, ...workerPrograms, ...fakePrograms];
  return {
    ports,
    programs: Object.fromEntries(all.map((p) => [p.name, p])),
    stop: (graceMs) => stopInOrder(all, graceMs),
  };
}
