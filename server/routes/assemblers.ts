import type { Knex } from 'knex';
import { assemblerProfileSchema } from '../../shared/schemas/production';
import { parseWith } from '../errors';
import type { RouteDef } from '../http/route-table';
import { listAssemblers, updateAssemblerProfile } from '../services/production/assignment';
import { PLANNING } from '../../shared/roles';
import { pathId } from '../http/params';

export function assemblerRoutes(knex: Knex): RouteDef[] {
  return [
    { method: 'get', path: '/api/assemblers', allow: PLANNING, cache: true, handler: async (_req, res) => res.json({ assemblers: await listAssemblers(knex) }) },
    {
      method: 'put', path: '/api/assemblers/:id', allow: PLANNING,
      handler: async (req, res) => {
        const id = pathId(req, 'id', 'assembler');
        res.json({ assembler: await updateAssemblerProfile(knex, id, parseWith(assemblerProfileSchema, req.body)) });
      },
    },
  ];
}
