import { execFile } from 'node:child_process';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, describe, expect, it } from 'vitest';
import { stockCheckJob } from '../../server/jobs/stock-check';
import { appendMovements, compareBalances, lockBatchRow, lockParts, lockUnitRows, rebuildBalances } from '../../server/services/stock/ledger';
import { startTestApp } from '../support/app';
import { makeCatalog } from './production-fixture';

const t = startTestApp();
afterAll(() => t.stop());

describe('the stock ledger service', () => {
  it('moves the balance with each movement, and refuses (writing nothing) what would go below zero', async () => {
    const c = await makeCatalog(t.knex, { stock: 5 });
    await t.knex.transaction((trx) => appendMovements(trx, [
      { partId: c.parts.pcb, kind: 'reserve', quantity: 3, reason: 'test' },
      { partId: c.parts.pcb, kind: 'consume', quantity: 1, reason: 'test' },
    ]));
    expect(await t.knex('part_balances').where({ part_id: c.parts.pcb }).first('on_hand', 'reserved')).toEqual({ on_hand: 4, reserved: 3 });
    const refused = await t.knex.transaction((trx) => appendMovements(trx, [{ partId: c.parts.pcb, kind: 'reserve', quantity: 2, reason: 'too much' }])).catch((e: { status: number; message: string }) => e);
    expect(refused).toMatchObject({ status: 409 });
    expect((refused as unknown as Error).message).toMatch(/1 available \(4 on hand, 3 reserved\)/);
    expect(await t.knex('stock_movements').where({ part_id: c.parts.pcb }).count({ n: '*' }).first()).toEqual({ n: 3 });
    expect(await compareBalances(t.knex, Object.values(c.parts))).toEqual([]);
  });

  it('refuses a lock taken against the lock order (parts before the batch)', async () => {
    const c = await makeCatalog(t.knex);
    const batch = await t.knex('batches').first('id');
    const error = await t.knex.transaction(async (trx) => {
      await lockParts(trx, [c.parts.pcb]);
      await lockBatchRow(trx, batch.id);
    }).catch((e: Error) => e);
    expect((error as Error).message).toBe('Lock order broken: batch locked after parts (the order is batch → units → parts)');
    const unitsAfterParts = await t.knex.transaction(async (trx) => {
      await lockParts(trx, [c.parts.pcb]);
      await lockUnitRows(trx, [1]);
    }).catch((e: Error) => e);
    expect((unitsAfterParts as Error).message).toMatch(/units locked after parts/);
    // In order, and a step skipped, is fine.
    await t.knex.transaction(async (trx) => {
      await lockBatchRow(trx, batch.id);
      await lockParts(trx, [c.parts.opamp, c.parts.pcb]);
    });
  });

  it('the check finds a movement written around the service, the job reports it, and a rebuild repairs it from the ledger', async () => {
    const c = await makeCatalog(t.knex, { stock: 7 });
    await t.knex('stock_movements').insert({ part_id: c.parts.led, kind: 'receive', quantity: 4, on_hand_delta: 4, reserved_delta: 0, reason: 'written around the ledger' });
    const differences = await compareBalances(t.knex, Object.values(c.parts));
    expect(differences).toEqual([{ partId: c.parts.led, partNumber: `LED-${c.tag}`, balance: { onHand: 200, reserved: 0 }, ledger: { onHand: 204, reserved: 0 } }]);
    const lines: string[] = [];
    await stockCheckJob(t.knex, (line) => lines.push(line)).handler({} as never, { data: null, signal: new AbortController().signal });
    expect(lines.filter((l) => l.includes(`LED-${c.tag}`))).toEqual([`[stock] balance differs from the ledger for LED-${c.tag}: balance 200/0, ledger 204/0 (on hand/reserved)`]);
    await rebuildBalances(t.knex);
    expect(await compareBalances(t.knex, Object.values(c.parts))).toEqual([]);
    expect(await t.knex('part_stock').where({ part_id: c.parts.led }).first()).toEqual({ part_id: c.parts.led, on_hand: 204, reserved: 0, available: 204 });
  });

  it('npm run stock:check reports every balance in agreement', async () => {
    const tsx = path.join(process.cwd(), 'node_modules', '.bin', 'tsx');
    const { stdout } = await promisify(execFile)(tsx, ['scripts/stock-check.ts'], { env: { ...process.env, DATABASE_URL: process.env.DATABASE_URL } });
    expect(stdout).toMatch(/\[stock\] \d+ parts: every balance equals the sum of its ledger/);
  }, 60_000);
});
