import type { Knex } from 'knex';
import type { Request } from 'express';
import { STAFF_ROLES, type SessionUser } from '../../shared/roles';
import { invalid } from '../errors';
import type { RouteDef } from '../http/route-table';
import { getModel, getModelPhoto, listModels } from '../services/catalog/models-read';

/** Staff see unpublished models, costs and stock; everyone else the published catalog only. */
export const isStaff = (req: Request) => {
  const user = req.user as SessionUser | undefined;
  return !!user && STAFF_ROLES.includes(user.role);
};

export function idParam(value: unknown, field = 'id'): number {
  const id = Number(value);
  if (!Number.isInteger(id) || id <= 0 || id > 2_147_483_647) throw invalid(`The ${field} must be a positive whole number`, { [field]: 'Not a valid id' });
  return id;
}

export function modelRoutes(knex: Knex): RouteDef[] {
  return [
    { method: 'get', path: '/api/models', allow: 'public', handler: async (req, res) => res.json({ models: await listModels(knex, isStaff(req)) }) },
    { method: 'get', path: '/api/models/:id', allow: 'public', handler: async (req, res) => res.json({ model: await getModel(knex, idParam(req.params.id), isStaff(req)) }) },
    {
      method: 'get', path: '/api/models/:id/photo', allow: 'public',
      handler: async (req, res) => {
        const photo = await getModelPhoto(knex, idParam(req.params.id), isStaff(req));
        res.set('Content-Type', photo.content_type);
        res.set('Cache-Control', 'public, max-age=3600');
        res.set('X-Content-Type-Options', 'nosniff');
        res.send(photo.data);
      },
    },
  ];
}
