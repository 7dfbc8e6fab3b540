import type { Knex } from 'knex';
import type { Role } from '../../shared/roles';
import type { Config } from '../config';
import { applyAssignmentsSchema, cancelSchema, createBatchSchema, proposePlanSchema, releaseBatchSchema } from '../../shared/schemas/production';
import { invalid, parseWith } from '../errors';
import { currentUser, type RouteDef } from '../http/route-table';
import { applyAssignments, proposeBatchPlan } from '../services/production/assignment';
import { createBatch, getBatch, listBatches, planningCandidates, purchaseListCsv } from '../services/production/planning';
import { cancelBatch, releaseBatch } from '../services/production/release';
import { kitBatch, reserveForBatch } from '../services/production/stock';

export const PLANNERS: Role[] = ['owner', 'planner'];

/** A positive whole-number path parameter, or a 400 naming it. */
export function idParam(value: unknown, name = 'id'): number {
  const id = Number(value);
  if (!Number.isInteger(id) || id <= 0) throw invalid(`The ${name} must be a positive whole number`, { [name]: 'Not a valid id' });
  return id;
}

export function batchRoutes(knex: Knex, config: Pick<Config, 'publicUrl'>): RouteDef[] {
  return [
    { method: 'get', path: '/api/batches', allow: PLANNERS, handler: async (_req, res) => res.json({ batches: await listBatches(knex) }) },
    { method: 'get', path: '/api/batches/candidates', allow: PLANNERS, handler: async (_req, res) => res.json(await planningCandidates(knex)) },
    {
      method: 'post', path: '/api/batches', allow: PLANNERS,
      handler: async (req, res) => res.status(201).json(await createBatch(knex, currentUser(req).id, parseWith(createBatchSchema, req.body))),
    },
    { method: 'get', path: '/api/batches/:id', allow: PLANNERS, handler: async (req, res) => res.json(await getBatch(knex, idParam(req.params.id))) },
    {
      method: 'get', path: '/api/batches/:id/purchase-list.csv', allow: PLANNERS,
      handler: async (req, res) => {
        const { filename, csv } = await purchaseListCsv(knex, idParam(req.params.id));
        res.type('text/csv').attachment(filename).send(csv);
      },
    },
    {
      method: 'post', path: '/api/batches/:id/release', allow: PLANNERS,
      handler: async (req, res) => {
        const id = idParam(req.params.id);
        res.json(await releaseBatch(knex, currentUser(req).id, id, parseWith(releaseBatchSchema, req.body), config.publicUrl));
      },
    },
    {
      method: 'post', path: '/api/batches/:id/cancel', allow: PLANNERS,
      handler: async (req, res) => {
        const id = idParam(req.params.id);
        res.json(await cancelBatch(knex, currentUser(req).id, id, parseWith(cancelSchema, req.body).reason));
      },
    },
    { method: 'post', path: '/api/batches/:id/reserve', allow: PLANNERS, handler: async (req, res) => res.json(await reserveForBatch(knex, currentUser(req).id, idParam(req.params.id))) },
    { method: 'post', path: '/api/batches/:id/kit', allow: PLANNERS, handler: async (req, res) => res.json(await kitBatch(knex, currentUser(req).id, idParam(req.params.id))) },
    {
      method: 'post', path: '/api/batches/:id/plan-proposal', allow: PLANNERS,
      handler: async (req, res) => {
        const id = idParam(req.params.id);
        res.json(await proposeBatchPlan(knex, id, parseWith(proposePlanSchema, req.body).startDate));
      },
    },
    {
      method: 'post', path: '/api/batches/:id/assignments', allow: PLANNERS,
      handler: async (req, res) => {
        const id = idParam(req.params.id);
        res.json(await applyAssignments(knex, currentUser(req).id, id, parseWith(applyAssignmentsSchema, req.body)));
      },
    },
  ];
}
