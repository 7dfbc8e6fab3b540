// `npm run bench -- plans [--scale 5]`: every route of the api bench, read once with the response
// cache off, on the production-size dataset; each SQL query it ran is run again under EXPLAIN ANALYZE
// and printed with its execution time. A sequential scan or a sort of more than SCAN_FLAG_ROWS rows
// is flagged: on five years of history those are the reads whose cost grows with the past rather
// than with the page. A list count reads up to COUNT_CAP + 1 rows by design (server/http/paged.ts),
// a bounded cost, so the limit sits just above it. Prints figures; asserts nothing. (The session read goes through pg directly
// and is not listed.)
import type { AddressInfo } from 'node:net';
import pg from 'pg';
import { createApp } from '../../server/app';
import { loadConfig } from '../../server/config';
import { createKnex } from '../../server/db/knex';
import { COUNT_CAP } from '../../shared/schemas/list';
import { benchAppEnv, benchBatch, benchRoutes, signInAll } from './api-routes';
import { benchDatabaseUrl, ensureDataset, scaleFromArgs } from './dataset';
import type { BenchSection } from './engine';

const SCAN_FLAG_ROWS = COUNT_CAP + 1;

interface PlanNode { 'Node Type': string; 'Relation Name'?: string; 'Actual Rows': number; 'Actual Loops': number; 'Rows Removed by Filter'?: number; Plans?: PlanNode[] }

/** The plan's nodes that read or sort more than SCAN_FLAG_ROWS rows, one line each. */
function bigReads(node: PlanNode, out: string[] = []): string[] {
  const rows = node['Actual Rows'] * node['Actual Loops'] + (node['Rows Removed by Filter'] ?? 0) * node['Actual Loops'];
  if (node['Node Type'] === 'Seq Scan' && rows > SCAN_FLAG_ROWS) out.push(`sequential scan of ${node['Relation Name']}, ${rows} rows`);
  if (node['Node Type'] === 'Sort' && rows > SCAN_FLAG_ROWS) out.push(`sort of ${rows} rows`);
  for (const child of node.Plans ?? []) bigReads(child, out);
  return out;
}

async function runPlansBench() {
  const scale = scaleFromArgs(process.argv.slice(2));
  const url = benchDatabaseUrl();
  console.log(`\n## Query plans of every api bench route (scale ${scale}, response cache off; flags: scans and sorts over ${SCAN_FLAG_ROWS} rows)`);
  const dataset = await ensureDataset(url, scale);
  const config = loadConfig({ ...benchAppEnv(url), RESPONSE_CACHE: 'false' });
  const knex = createKnex(url, 4);
  // Every query knex sends, as sent (text with $n and its values), taken where knex hands it to pg.
  const sent: { sql: string; bindings: unknown[] }[] = [];
  const client = knex.client as unknown as { _query: (connection: unknown, obj: { sql: string; bindings?: unknown[] }) => Promise<unknown> };
  const run = client._query.bind(client);
  client._query = (connection, obj) => {
    sent.push({ sql: obj.sql, bindings: [...(obj.bindings ?? [])] });
    return run(connection, obj);
  };
  const explain = new pg.Client({ connectionString: url });
  await explain.connect();
  const { app } = createApp({ knex, config });
  const server = app.listen(0, '127.0.0.1');
  try {
    await new Promise((resolve) => server.once('listening', resolve));
    const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    const cookies = await signInAll(base);
    const batch = await benchBatch(knex);
    let flagged = 0;
    let queries = 0;
    for (const route of benchRoutes(batch)) {
      sent.length = 0;
      const res = await fetch(base + route.path, { headers: { cookie: cookies[route.as] } });
      await res.arrayBuffer();
      const mine = sent.filter((q) => !/^\s*(begin|commit|rollback|savepoint|release)\b/i.test(q.sql));
      const lines: string[] = [];
      let total = 0;
      for (const q of mine) {
        const { rows } = await explain.query(`EXPLAIN (ANALYZE, FORMAT JSON) ${q.sql}`, q.bindings);
        const plan = rows[0]['QUERY PLAN'][0] as { Plan: PlanNode; 'Execution Time': number };
        total += plan['Execution Time'];
        const reads = bigReads(plan.Plan);
        flagged += reads.length;
        lines.push(`    ${plan['Execution Time'].toFixed(2).padStart(6)} ms  ${q.sql.replace(/\s+/g, ' ').slice(0, 100)}`);
        for (const r of reads) lines.push(`             FLAG ${r}`);
      }
      queries += mine.length;
      console.log(`plans ${route.label} (as ${route.as}): status ${res.status}, ${mine.length} queries, ${total.toFixed(2)} ms executing`);
      for (const l of lines) console.log(l);
    }
    console.log(`plans: ${queries} queries over ${benchRoutes(batch).length} routes at ${dataset.units} units; ${flagged} flagged (target 0)`);
  } finally {
    server.close();
    await explain.end();
    await knex.destroy();
  }
}

export const plansSection: BenchSection = { key: 'plans', name: 'query plans', run: runPlansBench };
