import type { Knex } from 'knex';
import { createUserSchema, updateUserSchema } from '../../shared/schemas/auth';
import { invalid, parseWith } from '../errors';
import { currentUser, type RouteDef } from '../http/route-table';
import * as users from '../services/users';

function idParam(value: string): number {
  const id = Number(value);
  if (!Number.isInteger(id) || id <= 0) throw invalid('The id must be a positive whole number', { id: 'Not a valid id' });
  return id;
}

export function userRoutes(knex: Knex): RouteDef[] {
  return [
    { method: 'get', path: '/api/users', allow: ['owner'], handler: async (_req, res) => res.json({ users: await users.listUsers(knex) }) },
    {
      method: 'post', path: '/api/users', allow: ['owner'],
      handler: async (req, res) => res.status(201).json({ user: await users.createUser(knex, parseWith(createUserSchema, req.body)) }),
    },
    {
      method: 'patch', path: '/api/users/:id', allow: ['owner'],
      handler: async (req, res) => {
        const input = parseWith(updateUserSchema, req.body);
        res.json({ user: await users.updateUser(knex, currentUser(req).id, idParam(String(req.params.id)), input) });
      },
    },
  ];
}
