import type { Knex } from 'knex';
import { compareBalances } from '../services/stock/ledger';
import type { JobDefinition } from './boss';

export const STOCK_CHECK_QUEUE = 'stock-balance-check';

/**
 * Nightly housekeeping: compares every part's stored balance with the sum of its ledger and logs
 * each difference, so drift (a movement written around the ledger service) is noticed within a
 * day. It reports and never repairs: `npm run stock:check -- --repair` is a person's decision.
 */
export function stockCheckJob(knex: Knex, log: (line: string) => void = (line) => console.warn(line)): JobDefinition {
  return {
    name: STOCK_CHECK_QUEUE,
    policy: 'stately',
    cron: '17 3 * * *',
    handler: async () => {
      const differences = await compareBalances(knex);
      for (const d of differences) {
        log(`[stock] balance differs from the ledger for ${d.partNumber}: balance ${d.balance.onHand}/${d.balance.reserved}, ledger ${d.ledger.onHand}/${d.ledger.reserved} (on hand/reserved)`);
      }
    },
  };
}
