import type { Knex } from 'knex';
import { assemblerProfileSchema } from '../../shared/schemas/production';
import { parseWith } from '../errors';
import type { RouteDef } from '../http/route-table';
import { listAssemblers, updateAssemblerProfile } from '../services/production/assignment';
import { idParam, PLANNERS } from './batches';

export function assemblerRoutes(knex: Knex): RouteDef[] {
  return [
    { method: 'get', path: '/api/assemblers', allow: PLANNERS, handler: async (_req, res) => res.json({ assemblers: await listAssemblers(knex) }) },
    {
      method: 'put', path: '/api/assemblers/:id', allow: PLANNERS,
      handler: async (req, res) => {
        const id = idParam(req.params.id);
        res.json({ assembler: await updateAssemblerProfile(knex, id, parseWith(assemblerProfileSchema, req.body)) });
      },
    },
  ];
}
