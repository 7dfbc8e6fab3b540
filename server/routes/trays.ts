import type { Knex } from 'knex';
import { PLANNING, STAFF } from '../../shared/roles';
import { acceptMatchSchema, createTraySchema, matchProposalSchema, trayImportSchema, trayListSchema, trayReadingsSchema } from '../../shared/schemas/trays';
import { parseWith } from '../errors';
import { pathId } from '../http/params';
import { currentUser, type RouteDef } from '../http/route-table';
import { singleUpload } from '../http/upload';
import { acceptMatching, proposeMatching } from '../services/production/matching';
import { createTray, getTray, importReadings, listTrays, saveReadings } from '../services/production/trays';

/** A meter's CSV of at most 500 readings is a few KiB; 256 KiB leaves room for extra columns. */
const METER_CSV_MAX_BYTES = 256 * 1024;

// Trays are measured by whoever is at the bench (any staff); matching a batch to them is planning.
export function trayRoutes(knex: Knex): RouteDef[] {
  const trayId = (req: Parameters<typeof pathId>[0]) => pathId(req, 'id', 'tray');
  return [
    { method: 'get', path: '/api/trays', allow: STAFF, cache: true, handler: async (req, res) => res.json(await listTrays(knex, parseWith(trayListSchema, req.query))) },
    { method: 'post', path: '/api/trays', allow: STAFF, handler: async (req, res) => res.status(201).json(await createTray(knex, currentUser(req), parseWith(createTraySchema, req.body))) },
    { method: 'get', path: '/api/trays/:id', allow: STAFF, cache: true, handler: async (req, res) => res.json(await getTray(knex, trayId(req))) },
    {
      method: 'put', path: '/api/trays/:id/slots', allow: STAFF,
      handler: async (req, res) => {
        const id = trayId(req);
        res.json(await saveReadings(knex, currentUser(req), id, parseWith(trayReadingsSchema, req.body)));
      },
    },
    {
      method: 'post', path: '/api/trays/:id/import', allow: STAFF, before: [singleUpload('file', METER_CSV_MAX_BYTES, 'meter CSV')],
      handler: async (req, res) => {
        const id = trayId(req);
        const { firstSlot } = parseWith(trayImportSchema, req.body ?? {});
        res.json(await importReadings(knex, currentUser(req), id, req.file?.buffer, firstSlot));
      },
    },
    {
      method: 'post', path: '/api/batches/:id/matching/proposal', allow: PLANNING,
      handler: async (req, res) => {
        const id = pathId(req, 'id', 'batch');
        res.json(await proposeMatching(knex, id, parseWith(matchProposalSchema, req.body ?? {})));
      },
    },
    {
      method: 'post', path: '/api/batches/:id/matching', allow: PLANNING,
      handler: async (req, res) => {
        const id = pathId(req, 'id', 'batch');
        res.json(await acceptMatching(knex, currentUser(req), id, parseWith(acceptMatchSchema, req.body)));
      },
    },
  ];
}
