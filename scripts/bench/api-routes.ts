// The routes the api and plans benches read, the demo people they read them as (signed in
// through the API, as a browser would), and the production settings the app runs with there.
// KP_BENCH_ROUTES=orders,shipping keeps the routes whose label contains one of the words.
import { randomBytes } from 'node:crypto';
import type { Knex } from 'knex';

const PASSWORD = 'kneepoint-demo';

/** The app's environment on the bench database, as production runs it; production refuses the repository's published secrets, so each run makes its own. */
export function benchAppEnv(databaseUrl: string): NodeJS.ProcessEnv {
  const secret = () => randomBytes(24).toString('hex');
  return {
    ...process.env, DATABASE_URL: databaseUrl, NODE_ENV: 'production', PORT: '0', COOKIE_SECURE: 'false',
    SESSION_SECRET: secret(), PAYMENTS_API_KEY: secret(), PAYMENTS_WEBHOOK_SECRET: secret(),
  };
}

/** The batch whose size is nearest 50 units, for the batch page. */
export async function benchBatch(knex: Knex): Promise<{ id: number; n: number }> {
  const { rows: [batch] } = await knex.raw(`SELECT batch_id AS id, count(*)::int AS n FROM units GROUP BY batch_id ORDER BY abs(count(*) - 50), batch_id LIMIT 1`);
  return batch;
}

export interface Route { label: string; path: string; as: 'planner' | 'owner' | 'assembler' | 'customer' }
export type Cookies = Record<Route['as'], string>;

/** Every list route, the board and one batch page (`batch`: a batch of about 50 units). */
export function benchRoutes(batch: { id: number; n: number }): Route[] {
  const routes: Route[] = [
    { label: '/api/orders', path: '/api/orders', as: 'planner' },
    { label: '/api/shipping', path: '/api/shipping', as: 'planner' },
    { label: '/api/shipments', path: '/api/shipments', as: 'planner' },
    { label: '/api/batches', path: '/api/batches', as: 'planner' },
    { label: `/api/batches/:id (${batch.n} units)`, path: `/api/batches/${batch.id}`, as: 'planner' },
    { label: '/api/board', path: '/api/board', as: 'planner' },
    { label: '/api/parts', path: '/api/parts', as: 'planner' },
    { label: '/api/models', path: '/api/models', as: 'planner' },
    { label: '/api/bench', path: '/api/bench', as: 'planner' },
    { label: '/api/batches/candidates', path: '/api/batches/candidates', as: 'planner' },
    { label: '/api/devices', path: '/api/devices', as: 'planner' },
    { label: '/api/suppliers', path: '/api/suppliers', as: 'planner' },
    { label: '/api/assemblers', path: '/api/assemblers', as: 'planner' },
    { label: '/api/users', path: '/api/users', as: 'owner' },
    { label: '/api/builds', path: '/api/builds', as: 'assembler' },
    { label: '/api/orders/mine', path: '/api/orders/mine', as: 'customer' },
  ];
  const wanted = process.env.KP_BENCH_ROUTES?.split(',');
  return wanted ? routes.filter((r) => wanted.some((s) => r.label.includes(s))) : routes;
}

/** Signs in through the API as a browser would and returns the session cookie (and the CSRF token for writes). */
export async function signInWithToken(base: string, email: string): Promise<{ cookie: string; csrf: string }> {
  const csrf = await fetch(`${base}/api/auth/csrf`);
  const cookie = (csrf.headers.getSetCookie()[0] ?? '').split(';')[0];
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const res = await fetch(`${base}/api/auth/login`, {
    method: 'POST', headers: { 'content-type': 'application/json', 'x-csrf-token': csrfToken, cookie },
    body: JSON.stringify({ email, password: PASSWORD }),
  });
  if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status}`);
  const body = (await res.json()) as { csrfToken?: string };
  return { cookie: (res.headers.getSetCookie()[0] ?? cookie).split(';')[0], csrf: body.csrfToken ?? csrfToken };
}
const signIn = async (base: string, email: string) => (await signInWithToken(base, email)).cookie;

/** Signs in the four people the routes are read as. */
export async function signInAll(base: string): Promise<Cookies> {
  return {
    planner: await signIn(base, 'planner@shop.example'),
    owner: await signIn(base, 'owner@shop.example'),
    assembler: await signIn(base, 'assembler@shop.example'),
    customer: await signIn(base, 'customer@shop.example'),
  };
}
