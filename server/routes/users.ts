import type { Knex } from 'knex';
import { createUserSchema, updateUserSchema, userListSchema } from '../../shared/schemas/auth';
import { OWNER_ONLY } from '../../shared/roles';
import { parseWith } from '../errors';
import { pathId } from '../http/params';
import { currentUser, type RouteDef } from '../http/route-table';
import * as users from '../services/users';

export function userRoutes(knex: Knex): RouteDef[] {
  return [
    { method: 'get', path: '/api/users', allow: OWNER_ONLY, cache: true, handler: async (req, res) => res.json(await users.listUsers(knex, parseWith(userListSchema, req.query))) },
    {
      method: 'post', path: '/api/users', allow: OWNER_ONLY,
      handler: async (req, res) => res.status(201).json({ user: await users.createUser(knex, parseWith(createUserSchema, req.body)) }),
    },
    {
      method: 'patch', path: '/api/users/:id', allow: OWNER_ONLY,
      handler: async (req, res) => {
        const input = parseWith(updateUserSchema, req.body);
        res.json(await users.updateUser(knex, currentUser(req).id, pathId(req, 'id', 'user'), input));
      },
    },
    {
      method: 'post', path: '/api/role-changes/:id/undo', allow: OWNER_ONLY,
      handler: async (req, res) => res.json(await users.undoRoleChange(knex, currentUser(req).id, pathId(req, 'id', 'role change'))),
    },
  ];
}
