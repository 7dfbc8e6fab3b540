import { z } from 'zod';

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
  COOKIE_SECURE: z.enum(['true', 'false']).default('false'),
  LOGIN_MAX_FAILURES: z.coerce.number().int().min(1).default(8),
  LOGIN_WINDOW_MINUTES: z.coerce.number().int().min(1).default(15),
  PAYMENTS_API_KEY: z.string().default('sk_test_kneepoint_local'),
  PAYMENTS_HOST: z.string().default('127.0.0.1'),
  PAYMENTS_PORT: z.coerce.number().int().default(3101),
  PAYMENTS_PROTOCOL: z.enum(['http', 'https']).default('http'),
  PAYMENTS_WEBHOOK_SECRET: z.string().default('whsec_kneepoint_local'),
  SMTP_HOST: z.string().default('127.0.0.1'),
  SMTP_PORT: z.coerce.number().int().default(3125),
  SMTP_SECURE: z.enum(['true', 'false']).default('false'),
  SMTP_USER: z.string().optional(),
  SMTP_PASSWORD: z.string().optional(),
  MAIL_FROM: z.string().default('Kneepoint <workshop@shop.example>'),
  MAIL_INBOX_URL: z.string().url().default('http://127.0.0.1:3126'),
  // The outbox worker: how often it looks for due mail, the first retry delay (doubling), and when it gives up.
  OUTBOX_POLL_SECONDS: z.coerce.number().min(0.5).default(2),
  OUTBOX_RETRY_BASE_SECONDS: z.coerce.number().min(0).default(10),
  OUTBOX_MAX_ATTEMPTS: z.coerce.number().int().min(1).default(12),
});

export type Config = z.infer<typeof schema> & { publicUrl: string };

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const result = schema.safeParse(env);
  if (!result.success) {
    const lines = result.error.issues.map((i) => `  - ${i.path.join('.')}: ${i.message}`);
    throw new Error(`Kneepoint's configuration is not valid:\n${lines.join('\n')}`);
  }
  const c = result.data;
  return { ...c, publicUrl: c.PUBLIC_URL ?? `http://127.0.0.1:${c.PORT}` };
}
