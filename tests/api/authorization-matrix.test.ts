import { afterAll, describe, expect, it } from 'vitest';
import { ROLES, type Role } from '../../shared/roles';
import { anonymousAgent, DEMO, signedInAgent, startTestApp, type TestAgent } from '../support/app';

// Who may call each /api route. Every route the app mounts must have a row here, so a new
// route without a decision fails this test. 'public' = anyone; 'signed-in' = any role.
type Rule = 'public' | 'signed-in' | Role[];
const STAFF: Role[] = ['owner', 'planner', 'assembler', 'tester'];
const CATALOG_EDITORS: Role[] = ['owner', 'planner'];
export const MATRIX: Record<string, Rule> = {
  'GET /api/health': 'public',
  'GET /api/auth/csrf': 'public',
  'POST /api/auth/login': 'public',
  'POST /api/auth/logout': 'public',
  'GET /api/auth/me': 'signed-in',
  'POST /api/auth/register': 'public',
  'POST /api/auth/password': 'signed-in',
  'POST /api/auth/password-reset': 'public',
  'POST /api/auth/password-reset/confirm': 'public',
  'GET /api/users': ['owner'],
  'POST /api/users': ['owner'],
  'PATCH /api/users/:id': ['owner'],
  'POST /api/role-changes/:id/undo': ['owner'],
  'GET /api/settings/public': 'public',
  // Settings (issue 14): the owner alone reads and changes them; anyone may see the logo.
  'GET /api/settings': ['owner'],
  'PATCH /api/settings': ['owner'],
  'GET /api/settings/logo': 'public',
  'PUT /api/settings/logo': ['owner'],
  'DELETE /api/settings/logo': ['owner'],
  'POST /api/profiles': 'signed-in',
  // Option designer (issue 13): the owner's search in the compute pool.
  'POST /api/designs/search': ['owner'],
  // Catalog (issue 4)
  'GET /api/models': 'public',
  'GET /api/models/:id': 'public',
  'GET /api/models/:id/photo': 'public',
  'POST /api/models': CATALOG_EDITORS,
  'PATCH /api/models/:id': CATALOG_EDITORS,
  'PUT /api/models/:id/photo': CATALOG_EDITORS,
  'POST /api/models/:id/revisions': CATALOG_EDITORS,
  'POST /api/models/:id/options': CATALOG_EDITORS,
  'PATCH /api/options/:id': CATALOG_EDITORS,
  'GET /api/revisions/:id': STAFF,
  'PATCH /api/revisions/:id': CATALOG_EDITORS,
  'POST /api/revisions/:id/activate': CATALOG_EDITORS,
  'POST /api/revisions/:id/bom-lines': CATALOG_EDITORS,
  'PATCH /api/bom-lines/:id': CATALOG_EDITORS,
  'DELETE /api/bom-lines/:id': CATALOG_EDITORS,
  'POST /api/revisions/:id/bom-csv/preview': CATALOG_EDITORS,
  'POST /api/revisions/:id/bom-csv/import': CATALOG_EDITORS,
  'POST /api/revisions/:id/steps': CATALOG_EDITORS,
  'PATCH /api/steps/:id': CATALOG_EDITORS,
  'DELETE /api/steps/:id': CATALOG_EDITORS,
  'GET /api/parts': STAFF,
  'GET /api/parts/export.csv': STAFF,
  'GET /api/stock/movements.csv': STAFF,
  'GET /api/suppliers': STAFF,
  'POST /api/parts': CATALOG_EDITORS,
  'GET /api/parts/:id': STAFF,
  'PATCH /api/parts/:id': CATALOG_EDITORS,
  'POST /api/parts/:id/movements': CATALOG_EDITORS,
  'POST /api/stock/receive': CATALOG_EDITORS,
  'GET /api/devices': STAFF,
  'POST /api/devices': CATALOG_EDITORS,
  'GET /api/devices/:id': STAFF,
  'PATCH /api/devices/:id/part': CATALOG_EDITORS,
  // Ordering (issue 5): customers order and pay; owner and planner run orders and read the mail inbox.
  'POST /api/shop/quote': 'public',
  'GET /api/orders/mine': ['customer'],
  'POST /api/orders': ['customer'],
  'GET /api/orders': ['owner', 'planner'],
  'GET /api/orders/export.csv': ['owner', 'planner'],
  'GET /api/orders/:id': 'signed-in',
  'GET /api/invoices/:id/pdf': 'signed-in',
  'POST /api/orders/:id/checkout': ['customer'],
  'POST /api/orders/:id/cancel': ['customer', 'owner', 'planner'],
  'POST /api/orders/:id/notes': ['owner', 'planner'],
  'POST /api/orders/:id/delivered': ['owner', 'planner'],
  'POST /api/payments/webhook': 'public',
  'GET /api/mail/messages': ['owner', 'planner'],
  'GET /api/mail/messages/:id': ['owner', 'planner'],
  'GET /api/mail/messages/:id/attachments/:index': ['owner', 'planner'],
  // Production: planners run batches and shipping; an assembler works only their own builds
  // (the service refuses another's unit with a 403, see production-building.test.ts).
  'GET /api/batches': CATALOG_EDITORS,
  'GET /api/batches/candidates': CATALOG_EDITORS,
  'POST /api/batches': CATALOG_EDITORS,
  'GET /api/batches/:id': CATALOG_EDITORS,
  'GET /api/batches/:id/purchase-list.csv': CATALOG_EDITORS,
  'GET /api/batches/:id/serial-labels.pdf': CATALOG_EDITORS,
  'GET /api/orders/:id/packing-slip.pdf': CATALOG_EDITORS,
  'GET /api/carriers': CATALOG_EDITORS,
  'GET /api/orders/:id/address-label.pdf': CATALOG_EDITORS,
  'POST /api/batches/:id/lines': CATALOG_EDITORS,
  'DELETE /api/batches/:id/lines/:lineId': CATALOG_EDITORS,
  'POST /api/batches/:id/release': CATALOG_EDITORS,
  'POST /api/batches/:id/cancel': CATALOG_EDITORS,
  'POST /api/batches/:id/reserve': CATALOG_EDITORS,
  'POST /api/batches/:id/kit': CATALOG_EDITORS,
  'POST /api/batches/:id/plan-proposal': CATALOG_EDITORS,
  'POST /api/batches/:id/assignments': CATALOG_EDITORS,
  'GET /api/assemblers': CATALOG_EDITORS,
  'PUT /api/assemblers/:id': CATALOG_EDITORS,
  'GET /api/builds': ['assembler'],
  'GET /api/bench': ['owner', 'planner', 'tester'],
  'GET /api/units/:id': STAFF,
  'POST /api/units/:id/steps/:stepId/start': ['assembler'],
  'POST /api/units/:id/steps/:stepId/finish': ['assembler'],
  'POST /api/units/:id/steps/:stepId/reopen': ['assembler'],
  'GET /api/serials/:serial': STAFF,
  'PUT /api/units/:id/devices': ['assembler'],
  'PUT /api/units/:id/lots': ['assembler'],
  'POST /api/units/:id/photos': ['assembler'],
  'GET /api/units/:id/photos/:photoId': STAFF,
  'POST /api/units/:id/built': ['assembler'],
  'POST /api/units/:id/cancel': CATALOG_EDITORS,
  'POST /api/units/:id/tests': ['tester'],
  'POST /api/captures/analyse': ['owner', 'planner', 'tester'],
  // Trays and device matching (issue 12)
  'GET /api/trays': STAFF,
  'POST /api/trays': STAFF,
  'GET /api/trays/:id': STAFF,
  'PUT /api/trays/:id/slots': STAFF,
  'POST /api/trays/:id/import': STAFF,
  'POST /api/batches/:id/matching/proposal': CATALOG_EDITORS,
  'POST /api/batches/:id/matching': CATALOG_EDITORS,
  'GET /api/shipping': CATALOG_EDITORS,
  'GET /api/shipments': CATALOG_EDITORS,
  'POST /api/shipments': CATALOG_EDITORS,
  'GET /api/shipments/:id/packing-slip.pdf': CATALOG_EDITORS,
  'POST /api/shipments/:id/delivered': CATALOG_EDITORS,
  'POST /api/units/:id/finished-stock': CATALOG_EDITORS,
  'POST /api/order-lines/:id/from-stock': CATALOG_EDITORS,
  'GET /api/board': CATALOG_EDITORS,
  // Spec sheets (issue 7): any signed-in user may ask for a unit's sheet; the service answers a
  // customer 404 for a unit not on their order (see spec-sheets-access.test.ts).
  'GET /api/units/:serial/spec-sheet.pdf': 'signed-in',
  'GET /api/orders/:id/spec-sheets': 'signed-in',
  'POST /api/units/:serial/spec-sheet/regenerate': ['owner', 'planner', 'tester'],
  'POST /api/batches/:id/spec-sheets': ['owner', 'planner', 'tester'],
  'GET /api/batches/:id/spec-sheets/latest': ['owner', 'planner', 'tester'],
  'GET /api/spec-sheet-jobs/:id': ['owner', 'planner', 'tester'],
  'GET /api/spec-sheet-jobs/:id/archive.zip': ['owner', 'planner', 'tester'],
  'GET /verify/:serial': 'public',
  'GET /verify-fonts/:weight': 'public',
};
void STAFF;
void CATALOG_EDITORS;

const t = startTestApp();
afterAll(() => t.stop());

const identities: (Role | 'anonymous')[] = ['anonymous', ...ROLES];
const samplePath = (path: string) => path.replace(/:serial\b/g, 'KP-NONE-0000').replace(/:[a-zA-Z]+/g, '999999');

function allowed(rule: Rule, who: Role | 'anonymous') {
  if (rule === 'public') return true;
  if (who === 'anonymous') return false;
  return rule === 'signed-in' || rule.includes(who);
}

describe('authorization matrix', () => {
  it('has a decision for every mounted route, and no stale rows', () => {
    const mounted = t.registry.routes.map((r) => `${r.method.toUpperCase()} ${r.path}`);
    expect(mounted.filter((key) => !(key in MATRIX))).toEqual([]);
    expect(Object.keys(MATRIX).filter((key) => !mounted.includes(key))).toEqual([]);
  });

  it('lets each role through exactly where the table says', async () => {
    const agents = new Map<string, TestAgent>();
    agents.set('anonymous', await anonymousAgent(t.app));
    for (const role of ROLES) agents.set(role, await signedInAgent(t.app, DEMO[role]));
    const mismatches: string[] = [];
    // Sign-out ends the agent's session, so it goes last.
    const routes = [...t.registry.routes].sort((a, b) => Number(a.path === '/api/auth/logout') - Number(b.path === '/api/auth/logout'));
    for (const route of routes) {
      const key = `${route.method.toUpperCase()} ${route.path}`;
      for (const who of identities) {
        const agent = agents.get(who)!;
        const req = agent[route.method](samplePath(route.path)).set('X-CSRF-Token', agent.csrf);
        const res = route.method === 'get' ? await req : await req.send({});
        const expectAllowed = allowed(MATRIX[key], who);
        const denied = res.status === 401 || res.status === 403;
        if (expectAllowed === denied && !(route.path === '/api/auth/login' && res.status === 401)) {
          mismatches.push(`${key} as ${who}: got ${res.status}, expected ${expectAllowed ? 'allowed' : 'denied'}`);
        }
        if (!expectAllowed) {
          const wanted = who === 'anonymous' ? 401 : 403;
          if (res.status !== wanted) mismatches.push(`${key} as ${who}: got ${res.status}, expected ${wanted}`);
        }
      }
    }
    expect(mismatches).toEqual([]);
  });
});
