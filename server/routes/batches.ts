import type { Knex } from 'knex';
import { PLANNING } from '../../shared/roles';
import type { Config } from '../config';
import { addBatchLinesSchema, applyAssignmentsSchema, batchListSchema, cancelSchema, candidateLinesSchema, createBatchSchema, proposePlanSchema, releaseBatchSchema } from '../../shared/schemas/production';
import { parseWith } from '../errors';
import { pathId } from '../http/params';
import { currentUser, type RouteDef } from '../http/route-table';
import { applyAssignments, proposeBatchPlan } from '../services/production/assignment';
import { addBatchLines, createBatch, getBatch, removeBatchLine, listBatches, planningCandidates, purchaseListCsv } from '../services/production/planning';
import { cancelBatch, releaseBatch } from '../services/production/release';
import { kitBatch, reserveForBatch } from '../services/production/stock';

const batchId = (req: Parameters<typeof pathId>[0]) => pathId(req, 'id', 'batch');

export function batchRoutes(knex: Knex, config: Pick<Config, 'publicUrl' | 'RELEASE_CHUNK_UNITS'>): RouteDef[] {
  return [
    { method: 'get', path: '/api/batches', allow: PLANNING, cache: true, handler: async (req, res) => res.json(await listBatches(knex, parseWith(batchListSchema, req.query))) },
    { method: 'get', path: '/api/batches/candidates', allow: PLANNING, cache: true, handler: async (req, res) => res.json(await planningCandidates(knex, parseWith(candidateLinesSchema, req.query))) },
    {
      method: 'post', path: '/api/batches', allow: PLANNING,
      handler: async (req, res) => res.status(201).json(await createBatch(knex, currentUser(req).id, parseWith(createBatchSchema, req.body))),
    },
    { method: 'get', path: '/api/batches/:id', allow: PLANNING, cache: true, handler: async (req, res) => res.json(await getBatch(knex, batchId(req))) },
    {
      method: 'get', path: '/api/batches/:id/purchase-list.csv', allow: PLANNING,
      handler: async (req, res) => {
        const { filename, csv } = await purchaseListCsv(knex, batchId(req));
        res.type('text/csv').attachment(filename).send(csv);
      },
    },
    {
      // A batch being planned takes more order lines or stock builds (409 once released).
      method: 'post', path: '/api/batches/:id/lines', allow: PLANNING,
      handler: async (req, res) => {
        const id = batchId(req);
        res.status(201).json(await addBatchLines(knex, id, parseWith(addBatchLinesSchema, req.body)));
      },
    },
    {
      method: 'delete', path: '/api/batches/:id/lines/:lineId', allow: PLANNING,
      handler: async (req, res) => res.json(await removeBatchLine(knex, batchId(req), pathId(req, 'lineId', 'batch line'))),
    },
    {
      method: 'post', path: '/api/batches/:id/release', allow: PLANNING,
      handler: async (req, res) => {
        const id = batchId(req);
        // A big batch is accepted (202) and its units are made by the release job; GET /api/batches/:id shows progress.
        const result = await releaseBatch(knex, currentUser(req).id, id, parseWith(releaseBatchSchema, req.body), config.publicUrl, config.RELEASE_CHUNK_UNITS);
        res.status(result.state === 'releasing' ? 202 : 200).json(result);
      },
    },
    {
      method: 'post', path: '/api/batches/:id/cancel', allow: PLANNING,
      handler: async (req, res) => {
        const id = batchId(req);
        res.json(await cancelBatch(knex, currentUser(req).id, id, parseWith(cancelSchema, req.body).reason));
      },
    },
    { method: 'post', path: '/api/batches/:id/reserve', allow: PLANNING, handler: async (req, res) => res.json(await reserveForBatch(knex, currentUser(req).id, batchId(req))) },
    { method: 'post', path: '/api/batches/:id/kit', allow: PLANNING, handler: async (req, res) => res.json(await kitBatch(knex, currentUser(req).id, batchId(req))) },
    {
      method: 'post', path: '/api/batches/:id/plan-proposal', allow: PLANNING,
      handler: async (req, res) => {
        const id = batchId(req);
        res.json(await proposeBatchPlan(knex, id, parseWith(proposePlanSchema, req.body).startDate));
      },
    },
    {
      method: 'post', path: '/api/batches/:id/assignments', allow: PLANNING,
      handler: async (req, res) => {
        const id = batchId(req);
        res.json(await applyAssignments(knex, currentUser(req).id, id, parseWith(applyAssignmentsSchema, req.body)));
      },
    },
  ];
}
