import { z } from 'zod';
import { checkSecrets, PRODUCTION_SECRETS } from './secrets';

const flag = z.enum(['true', 'false']);
const count = (fallback: number) => z.coerce.number().int().min(1).default(fallback);

// Configuration is read once at start-up; a wrong value stops the server with a readable list.
const schema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  DATABASE_URL: z.string().url('DATABASE_URL must be a postgres:// URL'),
  PORT: z.coerce.number().int().min(0).max(65535).default(3000),
  HOST: z.string().default('127.0.0.1'),
  // What this process runs: web (HTTP only), worker (background jobs only) or all (both, one process).
  KP_ROLE: z.enum(['web', 'worker', 'all']).default('all'),
  PUBLIC_URL: z.string().url().optional(),
  SESSION_SECRET: z.string().min(16, 'SESSION_SECRET must be at least 16 characters'),
  // Unset: Secure cookies in production, plain ones in development and tests.
  COOKIE_SECURE: flag.optional(),
  // Which proxies may set X-Forwarded-For / -Proto: express's `trust proxy` (a hop count, or
  // addresses, subnets and loopback/linklocal/uniquelocal, comma-separated). Unset: none.
  TRUST_PROXY: z.string().trim().default(''),
  // Failed sign-ins: per account (the e-mail, from any address) and per client address (any e-mail).
  LOGIN_MAX_FAILURES: count(8),
  LOGIN_ADDRESS_MAX_FAILURES: count(30),
  LOGIN_WINDOW_MINUTES: count(15),
  // Registrations per client address.
  REGISTER_MAX_PER_ADDRESS: count(10),
  REGISTER_WINDOW_MINUTES: count(60),
  // Wrong current passwords per account when changing it.
  PASSWORD_CHANGE_MAX_FAILURES: count(5),
  PASSWORD_CHANGE_WINDOW_MINUTES: count(15),
  // "Forgot password" requests per client address and per e-mail typed, and wrong or dead links per address.
  PASSWORD_RESET_MAX_PER_ADDRESS: count(10),
  PASSWORD_RESET_MAX_PER_ACCOUNT: count(3),
  PASSWORD_RESET_WINDOW_MINUTES: count(60),
  PASSWORD_RESET_CONFIRM_MAX_FAILURES: count(20),
  // The public unit check: every request per minute, and unknown serials (or wrong codes) per day, per address.
  VERIFY_MAX_PER_MINUTE: count(30),
  VERIFY_MAX_MISSES_PER_DAY: count(60),
  PAYMENTS_API_KEY: z.string().default('sk_test_kneepoint_local'),
  PAYMENTS_HOST: z.string().default('127.0.0.1'),
  PAYMENTS_PORT: z.coerce.number().int().default(3101),
  PAYMENTS_PROTOCOL: z.enum(['http', 'https']).default('http'),
  PAYMENTS_WEBHOOK_SECRET: z.string().default('whsec_kneepoint_local'),
  SMTP_HOST: z.string().default('127.0.0.1'),
  SMTP_PORT: z.coerce.number().int().default(3125),
  SMTP_SECURE: flag.default('false'),
  SMTP_USER: z.string().optional(),
  SMTP_PASSWORD: z.string().optional(),
  MAIL_FROM: z.string().default('Kneepoint <workshop@shop.example>'),
  MAIL_INBOX_URL: z.string().url().default('http://127.0.0.1:3126'),
  // The outbox worker: how often it looks for due mail, the first retry delay (doubling), and when it gives up.
  OUTBOX_POLL_SECONDS: z.coerce.number().min(0.5).default(2),
  OUTBOX_RETRY_BASE_SECONDS: z.coerce.number().min(0).default(10),
  OUTBOX_MAX_ATTEMPTS: z.coerce.number().int().min(1).default(12),
  // The compute pool's worker threads (server/compute/pool.ts); unset = cores − 1, at least 1; 0 = inline (measuring only).
  COMPUTE_THREADS: z.coerce.number().int().min(0).max(64).optional(),
  // POST /api/profiles per account: requests per window, and the largest cost estimate accepted (server/services/engine/profiles.ts).
  PROFILE_RATE_LIMIT: z.coerce.number().int().min(1).default(60),
  PROFILE_RATE_WINDOW_SECONDS: z.coerce.number().int().min(1).default(60),
  PROFILE_MAX_COST: z.coerce.number().min(1).default(30),
  // A release creates its units in a background job, this many per transaction (server/services/production/release-job.ts).
  // Web processes resend a GET's JSON until any write commits (server/http/response-cache.ts).
  RESPONSE_CACHE: flag.default('true'),
  RELEASE_CHUNK_UNITS: z.coerce.number().int().min(1).max(5000).default(200),
});

export type Config = z.infer<typeof schema> & {
  publicUrl: string;
  cookieSecure: boolean;
  trustProxy: false | number | string;
};

const LOOPBACK_HOSTS = ['127.0.0.1', 'localhost', '[::1]'];

/** `trust proxy` from TRUST_PROXY: nothing by default, so a client cannot pick its own address. */
function trustProxy(value: string): false | number | string {
  if (value === '' || value === 'false') return false;
  if (/^\d+$/.test(value)) return Number(value);
  return value;
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const result = schema.safeParse(env);
  const production = env.NODE_ENV === 'production';
  // In production the secrets get their own, stricter check below, which names each one.
  const problems = result.success ? [] : result.error.issues
    .filter((i) => !(production && (PRODUCTION_SECRETS as readonly PropertyKey[]).includes(i.path[0])))
    .map((i) => `${i.path.join('.')}: ${i.message}`);
  if (production) problems.push(...checkSecrets(env));
  if (result.success) {
    const c = result.data;
    const publicUrl = c.PUBLIC_URL ?? `http://127.0.0.1:${c.PORT}`;
    const host = new URL(publicUrl).hostname;
    if (production && c.COOKIE_SECURE === 'false' && (!publicUrl.startsWith('http:') || !LOOPBACK_HOSTS.includes(host))) {
      problems.push(`COOKIE_SECURE: plain cookies in production are only for plain http on loopback, and PUBLIC_URL is ${publicUrl}`);
    }
    if (problems.length === 0) {
      const cookieSecure = c.COOKIE_SECURE ? c.COOKIE_SECURE === 'true' : production;
      return { ...c, publicUrl, cookieSecure, trustProxy: trustProxy(c.TRUST_PROXY) };
    }
  }
  throw new Error(`Kneepoint's configuration is not valid:\n${problems.map((p) => `  - ${p}`).join('\n')}`);
}
