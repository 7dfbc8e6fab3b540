import request from 'supertest';
import type { Knex } from 'knex';
import { createApp } from '../../server/app';
import { loadConfig } from '../../server/config';
import { createKnex } from '../../server/db/knex';

export const DEMO_PASSWORD = 'kneepoint-demo';
export const DEMO = {
  owner: 'owner@shop.example',
  planner: 'planner@shop.example',
  assembler: 'assembler@shop.example',
  tester: 'tester@shop.example',
  customer: 'customer@shop.example',
} as const;

// Every test file talks from 127.0.0.1 to one database: the per-address limits are raised here so
// files do not use up each other's counts; tests of those limits set their own (or another address).
const ADDRESS_LIMITS = {
  LOGIN_ADDRESS_MAX_FAILURES: '100000', REGISTER_MAX_PER_ADDRESS: '100000', VERIFY_MAX_MISSES_PER_DAY: '100000',
  PASSWORD_RESET_MAX_PER_ADDRESS: '100000', PASSWORD_RESET_CONFIRM_MAX_FAILURES: '100000',
};

/** The real app on the real test database that `npm test` prepared. */
export function startTestApp(env: Record<string, string> = {}) {
  if (!process.env.DATABASE_URL) throw new Error('DATABASE_URL is not set: run the tests through `npm test`.');
  const config = loadConfig({ ...process.env, NODE_ENV: 'test', SESSION_SECRET: 'test-secret-not-for-production', ...ADDRESS_LIMITS, ...env });
  const knex: Knex = createKnex(config.DATABASE_URL, 5);
  const built = createApp({ knex, config });
  return {
    ...built,
    knex,
    config,
    stop: async () => {
      await built.close();
      await knex.destroy();
    },
  };
}

export type TestAgent = ReturnType<typeof request.agent> & { csrf: string };

/** A cookie-keeping client holding a CSRF token, as a script would use the API. */
export async function anonymousAgent(app: Parameters<typeof request.agent>[0]): Promise<TestAgent> {
  const agent = request.agent(app) as TestAgent;
  const res = await agent.get('/api/auth/csrf').expect(200);
  agent.csrf = res.body.csrfToken;
  return agent;
}

/** Signs in through the API; throws with the status when the server refuses. */
export async function signedInAgent(app: Parameters<typeof request.agent>[0], email: string, password = DEMO_PASSWORD) {
  const agent = await anonymousAgent(app);
  const res = await agent.post('/api/auth/login').set('X-CSRF-Token', agent.csrf).send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  agent.csrf = res.body.csrfToken;
  return agent;
}

let counter = 0;
/** An e-mail nobody else in this test run uses. */
export const uniqueEmail = (label: string) => `${label}-${process.pid}-${Date.now()}-${counter++}@test.example`;
