import type { Knex } from 'knex';
import { ASSEMBLY, BENCH, PLANNING, STAFF, TESTING } from '../../shared/roles';
import type { Config } from '../config';
import { benchListSchema, buildListSchema, benchTestSchema, CAPTURE_LIMITS, captureAnalyseSchema, cancelSchema, deviceReadingsSchema, finishStepSchema, partLotsSchema, reopenStepSchema } from '../../shared/schemas/production';
import { parseWith } from '../errors';
import { pathId, pathSerial } from '../http/params';
import { singleUpload } from '../http/upload';
import { currentUser, type RouteDef } from '../http/route-table';
import { addPhoto, finishStep, getPhoto, getUnit, markBuilt, myBuilds, recordLots, recordReadings, reopenStep, startStep, unitBySerial } from '../services/production/building';
import { cancelUnit } from '../services/production/stock';
import { analyseCaptureUpload, benchQueue, recordTest } from '../services/production/testing';

const PHOTO_MAX_BYTES = 8 * 1024 * 1024;

export function unitRoutes(knex: Knex, config: Pick<Config, 'publicUrl'>): RouteDef[] {
  return [
    { method: 'get', path: '/api/builds', allow: ASSEMBLY, cache: true, handler: async (req, res) => res.json(await myBuilds(knex, currentUser(req).id, parseWith(buildListSchema, req.query))) },
    { method: 'get', path: '/api/bench', allow: BENCH, cache: true, handler: async (req, res) => res.json(await benchQueue(knex, parseWith(benchListSchema, req.query))) },
    { method: 'get', path: '/api/units/:id', allow: STAFF, cache: true, handler: async (req, res) => res.json(await getUnit(knex, currentUser(req), pathId(req, 'id', 'unit'))) },
    {
      method: 'post', path: '/api/units/:id/steps/:stepId/start', allow: ASSEMBLY,
      handler: async (req, res) => res.json(await startStep(knex, currentUser(req), pathId(req, 'id', 'unit'), pathId(req, 'stepId', 'step'))),
    },
    {
      method: 'post', path: '/api/units/:id/steps/:stepId/finish', allow: ASSEMBLY,
      handler: async (req, res) => {
        const [id, stepId] = [pathId(req, 'id', 'unit'), pathId(req, 'stepId', 'step')];
        // A finish far under the standard time is a 409 with code `fast_step` until confirmed.
        res.json(await finishStep(knex, currentUser(req), id, stepId, parseWith(finishStepSchema, req.body ?? {})));
      },
    },
    {
      method: 'post', path: '/api/units/:id/steps/:stepId/reopen', allow: ASSEMBLY,
      handler: async (req, res) => {
        const [id, stepId] = [pathId(req, 'id', 'unit'), pathId(req, 'stepId', 'step')];
        res.json(await reopenStep(knex, currentUser(req), id, stepId, parseWith(reopenStepSchema, req.body)));
      },
    },
    // A typed or scanned serial opens its unit (an assembler only their own).
    { method: 'get', path: '/api/serials/:serial', allow: STAFF, cache: true, handler: async (req, res) => res.json(await unitBySerial(knex, currentUser(req), pathSerial(req))) },
    {
      method: 'put', path: '/api/units/:id/devices', allow: ASSEMBLY,
      handler: async (req, res) => {
        const id = pathId(req, 'id', 'unit');
        res.json(await recordReadings(knex, currentUser(req), id, parseWith(deviceReadingsSchema, req.body)));
      },
    },
    {
      method: 'put', path: '/api/units/:id/lots', allow: ASSEMBLY,
      handler: async (req, res) => {
        const id = pathId(req, 'id', 'unit');
        res.json(await recordLots(knex, currentUser(req), id, parseWith(partLotsSchema, req.body)));
      },
    },
    {
      method: 'post', path: '/api/units/:id/photos', allow: ASSEMBLY, before: [singleUpload('photo', PHOTO_MAX_BYTES, 'photo')],
      handler: async (req, res) => {
        const id = pathId(req, 'id', 'unit');
        res.status(201).json(await addPhoto(knex, currentUser(req), id, req.file, String(req.body?.caption ?? '')));
      },
    },
    {
      method: 'get', path: '/api/units/:id/photos/:photoId', allow: STAFF,
      handler: async (req, res) => {
        const photo = await getPhoto(knex, currentUser(req), pathId(req, 'id', 'unit'), pathId(req, 'photoId', 'photo'));
        res.type(photo.content_type).send(photo.data);
      },
    },
    { method: 'post', path: '/api/units/:id/built', allow: ASSEMBLY, handler: async (req, res) => res.json(await markBuilt(knex, currentUser(req), pathId(req, 'id', 'unit'))) },
    {
      method: 'post', path: '/api/units/:id/cancel', allow: PLANNING,
      handler: async (req, res) => {
        const id = pathId(req, 'id', 'unit');
        res.json(await cancelUnit(knex, currentUser(req).id, id, parseWith(cancelSchema, req.body).reason));
      },
    },
    {
      method: 'post', path: '/api/units/:id/tests', allow: TESTING, before: [singleUpload('capture', CAPTURE_LIMITS.maxBytes, 'WAV capture')],
      handler: async (req, res) => {
        const id = pathId(req, 'id', 'unit');
        const input = parseWith(benchTestSchema, req.body);
        res.status(201).json(await recordTest(knex, currentUser(req), id, input, req.file, config.publicUrl));
      },
    },
    {
      // Reads a capture and records nothing: the test screen shows it before the tester decides.
      method: 'post', path: '/api/captures/analyse', allow: BENCH, before: [singleUpload('capture', CAPTURE_LIMITS.maxBytes, 'WAV capture')],
      handler: async (req, res) => {
        const { unitId } = parseWith(captureAnalyseSchema, req.body ?? {});
        res.json(await analyseCaptureUpload(knex, currentUser(req), req.file, unitId));
      },
    },
  ];
}
