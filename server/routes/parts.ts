import type { Knex } from 'knex';
import { movementSchema, partListQuerySchema, partSchema, partUpdateSchema, receiveSchema } from '../../shared/schemas/catalog';
import { parseWith } from '../errors';
import { currentUser, type RouteDef } from '../http/route-table';
import { createPart, getPart, listParts, listSuppliers, movementsCsv, partsCsv, updatePart } from '../services/catalog/parts';
import { addMovement, receiveDelivery } from '../services/catalog/stock';
import { PLANNING, STAFF } from '../../shared/roles';
import { pathId, queryId } from '../http/params';

function csv(res: import('express').Response, name: string, body: string) {
  res.set('Content-Type', 'text/csv; charset=utf-8');
  res.set('Content-Disposition', `attachment; filename="${name}"`);
  res.send(body);
}

export function partRoutes(knex: Knex): RouteDef[] {
  return [
    { method: 'get', path: '/api/parts', allow: STAFF, cache: true, handler: async (req, res) => res.json(await listParts(knex, parseWith(partListQuerySchema, req.query))) },
    { method: 'get', path: '/api/parts/export.csv', allow: STAFF, handler: async (req, res) => csv(res, 'parts.csv', await partsCsv(knex, parseWith(partListQuerySchema, req.query))) },
    { method: 'get', path: '/api/stock/movements.csv', allow: STAFF, handler: async (req, res) => csv(res, 'stock-movements.csv', await movementsCsv(knex, queryId(req, 'partId'))) },
    { method: 'get', path: '/api/suppliers', allow: STAFF, cache: true, handler: async (_req, res) => res.json({ suppliers: await listSuppliers(knex) }) },
    { method: 'post', path: '/api/parts', allow: PLANNING, handler: async (req, res) => res.status(201).json({ part: await createPart(knex, parseWith(partSchema, req.body)) }) },
    { method: 'get', path: '/api/parts/:id', allow: STAFF, cache: true, handler: async (req, res) => res.json({ part: await getPart(knex, pathId(req, 'id', 'part')) }) },
    { method: 'patch', path: '/api/parts/:id', allow: PLANNING, handler: async (req, res) => res.json({ part: await updatePart(knex, pathId(req, 'id', 'part'), parseWith(partUpdateSchema, req.body)) }) },
    {
      method: 'post', path: '/api/parts/:id/movements', allow: PLANNING,
      handler: async (req, res) => res.status(201).json(await addMovement(knex, pathId(req, 'id', 'part'), parseWith(movementSchema, req.body), currentUser(req).id)),
    },
    {
      method: 'post', path: '/api/stock/receive', allow: PLANNING,
      handler: async (req, res) => res.status(201).json(await receiveDelivery(knex, parseWith(receiveSchema, req.body), currentUser(req).id)),
    },
  ];
}
