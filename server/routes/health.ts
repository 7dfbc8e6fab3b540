import type { Knex } from 'knex';
import type { RouteDef } from '../http/route-table';

export function healthRoutes(knex: Knex): RouteDef[] {
  return [
    {
      method: 'get', path: '/api/health', allow: 'public',
      handler: async (_req, res) => {
        try {
          await knex.raw('SELECT 1');
          res.json({ ok: true, db: 'up' });
        } catch {
          res.status(503).json({ ok: false, db: 'down' });
        }
      },
    },
  ];
}
