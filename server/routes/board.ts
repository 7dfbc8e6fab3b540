import type { Knex } from 'knex';
import type { RouteDef } from '../http/route-table';
import { productionBoard } from '../services/production/board';
import { PLANNING } from '../../shared/roles';

export function boardRoutes(knex: Knex): RouteDef[] {
  return [{ method: 'get', path: '/api/board', allow: PLANNING, cache: true, handler: async (_req, res) => res.json(await productionBoard(knex)) }];
}
