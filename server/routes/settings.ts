import type { Knex } from 'knex';
import type { RouteDef } from '../http/route-table';
import { getPublicSettings } from '../services/settings';

export function settingsRoutes(knex: Knex): RouteDef[] {
  return [
    { method: 'get', path: '/api/settings/public', allow: 'public', handler: async (_req, res) => res.json(await getPublicSettings(knex)) },
  ];
}
