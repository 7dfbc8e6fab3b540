// Malformed input to every mounted route, generated from the route registry (as the authorization
// matrix is): bad path ids and serials, NUL bytes, impossible dates, wrong JSON types, wrong content
// types, empty bodies and broken multipart. Whatever the input, the answer must be below 500.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { RouteDef } from '../../server/http/route-table';
import { uploadFieldOf } from '../../server/http/upload';
import { startMailFake, type MailFake } from '../../server/fakes/mail/index';
import { startPaymentsFake, type PaymentsFake } from '../../server/fakes/payments/index';
import type { Role } from '../../shared/roles';
import { listen } from '../support/browser';
import { anonymousAgent, DEMO, signedInAgent, startTestApp, type TestAgent } from '../support/app';

const BAD_IDS = ['0', '-1', '2147483648', '1e308', '9999999999999999999', 'abc', '%00', '1.5', '12abc', '0x10'];
const BAD_SERIALS = ['%00', 'x'.repeat(300), 'constructor', '__proto__', '..%2F..%2Fetc', '1e308', '%E2%80%AE'];
// A well-formed id no row has: the route gets past its path check and reaches its body and service.
const MISSING_ID = '2147483647';
const LONG = 'x'.repeat(100_000);
const BAD_VALUES: unknown[] = ['\u0000', `a\u0000b`, '2026-02-31', '2026-13-45', 1e308, -1, 0, 2147483648, '9999999999999999999', 1.5, [], {}, null, LONG, true, [1e308], { id: 1e308 }];
// Field names the request schemas use; each fuzzed body gives all of them one bad value.
const KEYS = [
  'id', 'email', 'password', 'currentPassword', 'newPassword', 'name', 'role', 'fromRole', 'active', 'search', 'q', 'note', 'message', 'reason',
  'partId', 'batchId', 'unitId', 'orderId', 'modelId', 'optionId', 'revisionId', 'fromRevisionId', 'supplierId', 'assemblerId',
  'orderLineIds', 'stockBuilds', 'startDate', 'date', 'from', 'to', 'quantity', 'kind', 'reference', 'lines', 'builds', 'readings',
  'lots', 'skills', 'dailyCapacityMinutes', 'partNumber', 'category', 'sku', 'basePriceCents', 'published', 'title', 'standardMinutes',
  'code', 'topology', 'positive', 'negative', 'carrier', 'trackingNumber', 'outcome', 'currentDrawMa', 'measuredThdPercent', 'caption',
  'shipping', 'contract', 'circuit', 'drive', 'page', 'pageSize', 'sort', 'dir', 'state', 'status', 'token', 'carrierId',
  'shopName', 'shopEmail', 'shopAddress', 'vatId', 'publicUrl', 'serialPrefix', 'orderNumberPrefix', 'timeZone', 'locale',
  'labourCentsPerHour', 'homeCountry', 'ossOverThreshold', 'pricesIncludeTax', 'shippingZones', 'vfTestCurrentMa',
  'thdTolerancePercent', 'harmonicToleranceDb', 'maxCurrentDrawMa', 'fastStepPercent', 'paperSize', 'sheetStaffNames', 'carriers', 'country',
  'confirmFast',
  'toneHz', 'inputPeakV', 'driveGain', 'railPeakV', 'temperatureC', 'harmonics', 'devices', 'maxPerSide', 'symmetry', 'topologies',
  'seriesOhms', 'feedbackOhms', 'groundOhms', 'capacitorFarads', 'target', 'limit',
  'deviceId', 'supplierLot', 'receivedOn', 'notes', 'firstSlot', 'trayIds', 'units', 'slots', 'slot', 'vf', 'slotId', 'optionDeviceId',
];
const QUERY_KEYS = ['deviceId', 'q', 'size', 'search', 'from', 'to', 'partId', 'optionId', 'batchId', 'state', 'status', 'page', 'pageSize', 'sort', 'dir', 'category', 'lowStock', 'limit', 'offset', 'cursor'];
const BAD_QUERY_VALUES = ['%00', '2026-02-31', '2026-13-45', '1e308', '-1', '2147483648', '9999999999999999999', 'abc'];

// Nested shapes with bad ids and dates inside, where the schemas take arrays of objects.
const NESTED_BODIES = [
  { lines: [{ modelId: 1e308, optionId: 1, quantity: 1 }] },
  { lines: [{ modelId: 2147483648, optionId: 2147483648, quantity: 1 }] },
  { lines: [{ partId: 2147483648, quantity: 1 }], supplierId: 1, reference: 'x' },
  { revisionId: 2147483648, orderLineIds: [2147483648] },
  { revisionId: MISSING_ID, orderLineIds: [Number(MISSING_ID)] },
  { builds: [{ unitId: 1, assemblerId: 1, date: '2026-02-31' }] },
  { builds: [{ unitId: 2147483648, assemblerId: 1e308, date: '2026-13-45' }] },
  { readings: [{ optionDeviceId: 2147483648, vf: 0.6 }] },
  { lots: [{ bomLineId: 1e308, lot: 'L1' }] },
  { startDate: '2026-02-31' },
  { kind: 'receive', quantity: 1, reason: 'fuzz', batchId: 2147483648 },
  { kind: 'receive', quantity: 1, reason: 'fuzz', batchId: Number(MISSING_ID) },
  { partId: Number(MISSING_ID) },
  { fromRevisionId: 2147483648 },
  { carriers: [{ id: 2147483648, name: 'x', trackingUrlTemplate: 'https://x.example/{tracking}', active: true }] },
  { carriers: [{ id: Number(MISSING_ID), name: 'x', trackingUrlTemplate: 'https://x.example/{tracking}', active: true }] },
  { shippingZones: [{ id: 1e308, name: 'x', countries: ['DE', 'DE'], rateCents: -1 }] },
  { shipping: { country: 'ZZ' }, lines: [{ modelId: 1, optionId: 1, quantity: 1 }] },
  { readings: [{ slot: 1e308, vf: 0.6 }, { slot: 2147483648, vf: null }] },
  { units: [{ unitId: 2147483648, slots: [{ optionDeviceId: 1e308, slotId: Number(MISSING_ID) }] }] },
  { units: [{ unitId: Number(MISSING_ID), slots: [{ optionDeviceId: Number(MISSING_ID), slotId: Number(MISSING_ID) }] }] },
  { deviceId: Number(MISSING_ID), supplierLot: 'L', receivedOn: '2026-02-31' },
  { trayIds: [2147483648] },
];

interface Attempt {
  label: string;
  run: () => request.Test;
}

let t: ReturnType<typeof startTestApp>;
let mail: MailFake;
let payments: PaymentsFake;
let server: Awaited<ReturnType<typeof listen>>;
const agents = new Map<string, TestAgent>();

beforeAll(async () => {
  mail = await startMailFake({ smtpPort: 0, httpPort: 0 });
  payments = await startPaymentsFake({ port: 0, webhookSecret: 'whsec_kneepoint_fuzz' });
  t = startTestApp({ MAIL_INBOX_URL: mail.httpUrl, PAYMENTS_PORT: String(payments.port), PAYMENTS_WEBHOOK_SECRET: 'whsec_kneepoint_fuzz' });
  server = await listen(t.app);
  agents.set('anonymous', await anonymousAgent(server.url));
  // Signing out ends a session: the logout route gets an agent of its own.
  agents.set('logout', await anonymousAgent(server.url));
  for (const role of ['owner', 'planner', 'assembler', 'tester', 'customer'] as const) agents.set(role, await signedInAgent(server.url, DEMO[role]));
});
afterAll(async () => {
  await server?.close();
  await mail?.close();
  await payments?.close();
  await t?.stop();
});

/** Who calls a route: the owner where allowed, else the first role that may (so role-only routes get past their guard). */
function callers(route: RouteDef): (Role | 'anonymous')[] {
  if (route.allow === 'public') return ['anonymous', 'owner'];
  if (route.allow === 'signed-in') return ['owner', 'customer'];
  return route.allow.includes('owner') ? ['owner'] : [route.allow[0]];
}

/** The route's path with every parameter filled: `bad` for the one being fuzzed, a well-formed missing id elsewhere. */
function fill(path: string, target: string | null, bad: string) {
  return path.replace(/:([a-zA-Z]+)/g, (_m, name: string) => {
    if (name === target) return bad;
    if (name === 'serial') return 'KP-NONE-0000';
    if (name === 'weight') return 'regular';
    if (name === 'index') return '0';
    return MISSING_ID;
  });
}

function attemptsFor(route: RouteDef, who: Role | 'anonymous'): Attempt[] {
  const agent = () => agents.get(route.path === '/api/auth/logout' ? 'logout' : who)!;
  const method = route.method;
  const key = `${method.toUpperCase()} ${route.path} as ${who}`;
  const send = (path: string) => agent()[method](path).set('X-CSRF-Token', agent().csrf);
  const out: Attempt[] = [];
  const params = [...route.path.matchAll(/:([a-zA-Z]+)/g)].map((m) => m[1]);
  const goodPath = fill(route.path, null, '');

  for (const param of params) {
    const values = param === 'serial' ? BAD_SERIALS : param === 'weight' ? ['constructor', '__proto__', 'toString', 'hasOwnProperty', '%00', 'x'.repeat(300)] : BAD_IDS;
    for (const bad of values) out.push({ label: `${key} ${param}=${bad.slice(0, 20)}`, run: () => send(fill(route.path, param, bad)) });
  }
  for (const bad of BAD_QUERY_VALUES) {
    const query = QUERY_KEYS.map((k) => `${k}=${bad}`).join('&');
    out.push({ label: `${key} ?…=${bad}`, run: () => send(`${goodPath}?${query}`) });
  }
  out.push({ label: `${key} ?repeated keys`, run: () => send(`${goodPath}?${QUERY_KEYS.map((k) => `${k}=1&${k}=2`).join('&')}`) });
  out.push({ label: `${key} ?bracket keys`, run: () => send(`${goodPath}?${QUERY_KEYS.map((k) => `${k}[a]=1`).join('&')}`) });
  if (method === 'get') return out;

  for (const bad of BAD_VALUES) {
    const body = Object.fromEntries(KEYS.map((k) => [k, bad]));
    out.push({ label: `${key} body all=${JSON.stringify(bad)?.slice(0, 20)}`, run: () => send(goodPath).send(body) });
  }
  for (const body of NESTED_BODIES) out.push({ label: `${key} body ${JSON.stringify(body).slice(0, 60)}`, run: () => send(goodPath).send(body) });
  for (const body of [[], [1, 2], {}, { '': '' }]) out.push({ label: `${key} body ${JSON.stringify(body)}`, run: () => send(goodPath).send(body as object) });
  out.push({ label: `${key} json null`, run: () => send(goodPath).set('Content-Type', 'application/json').send('null') });
  out.push({ label: `${key} json number`, run: () => send(goodPath).set('Content-Type', 'application/json').send('1e308') });
  out.push({ label: `${key} broken json`, run: () => send(goodPath).set('Content-Type', 'application/json').send('{"a":') });
  out.push({ label: `${key} text/plain`, run: () => send(goodPath).set('Content-Type', 'text/plain').send('email=a\u0000b') });
  out.push({ label: `${key} form-urlencoded`, run: () => send(goodPath).type('form').send('email=a%00b&quantity=1e308&startDate=2026-02-31') });
  out.push({ label: `${key} no body`, run: () => send(goodPath) });
  out.push({ label: `${key} multipart to a JSON route`, run: () => send(goodPath).attach('file', Buffer.from('a,b\n'), 'x.csv') });

  const field = (route.before ?? []).map(uploadFieldOf).find(Boolean);
  if (field) {
    const png = Buffer.from('89504e470d0a1a0a0000000d49484452', 'hex');
    out.push({ label: `${key} two files`, run: () => send(goodPath).attach(field, png, 'a.png').attach(field, png, 'b.png') });
    out.push({ label: `${key} wrong field`, run: () => send(goodPath).attach('other', png, 'a.png') });
    out.push({ label: `${key} file and wrong field`, run: () => send(goodPath).attach(field, png, 'a.png').attach('other', png, 'b.png') });
    out.push({ label: `${key} text field NUL`, run: () => send(goodPath).field('caption', 'a\u0000b').field('currentDrawMa', '1e308').attach(field, png, 'a.png') });
    out.push({ label: `${key} many parts`, run: () => { let r = send(goodPath); for (let i = 0; i < 60; i++) r = r.field(`f${i}`, 'x'); return r; } });
    out.push({ label: `${key} file too large`, run: () => send(goodPath).attach(field, Buffer.alloc(13 * 1024 * 1024, 1), 'big.bin') });
    out.push({ label: `${key} not the expected type`, run: () => send(goodPath).attach(field, Buffer.from('RIFF\u0000\u0000\u0000\u0000WAVEfmt '), 'x.wav') });
    out.push({ label: `${key} truncated multipart`, run: () => send(goodPath).set('Content-Type', 'multipart/form-data; boundary=zz').send('--zz\r\nContent-Disposition: form-data; name="x"\r\n\r\nab') });
    out.push({ label: `${key} empty file`, run: () => send(goodPath).attach(field, Buffer.alloc(0), 'empty.png') });
  }
  return out;
}

async function runAll(attempts: Attempt[], concurrency: number) {
  const failures: string[] = [];
  let next = 0;
  let count = 0;
  async function worker() {
    while (next < attempts.length) {
      const attempt = attempts[next++];
      count++;
      try {
        const res = await attempt.run();
        if (res.status >= 500) failures.push(`${attempt.label} → ${res.status} ${JSON.stringify(res.body).slice(0, 160)}`);
      } catch (error) {
        failures.push(`${attempt.label} → no answer: ${(error as Error).message}`);
      }
    }
  }
  await Promise.all(Array.from({ length: concurrency }, worker));
  return { failures, count };
}

describe('malformed input to every route', () => {
  it('never answers 5xx', async () => {
    const attempts: Attempt[] = [];
    for (const route of t.registry.routes) {
      for (const who of callers(route)) {
        if (route.path === '/api/auth/logout' && who !== 'anonymous') continue;
        attempts.push(...attemptsFor(route, who));
      }
    }
    const { failures, count } = await runAll(attempts, 6);
    console.log(`fuzz: ${count} requests to ${t.registry.routes.length} routes, ${failures.length} answered 5xx`);
    expect(count).toBeGreaterThanOrEqual(2500);
    expect(failures, failures.join('\n')).toEqual([]);
  }, 300_000);
});
