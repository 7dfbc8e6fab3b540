import type { Knex } from 'knex';
import multer from 'multer';
import type { RequestHandler } from 'express';
import type { Role } from '../../shared/roles';
import type { Config } from '../config';
import { benchTestSchema, CAPTURE_LIMITS, cancelSchema, deviceReadingsSchema, partLotsSchema } from '../../shared/schemas/production';
import { invalid, parseWith, tooLarge } from '../errors';
import { currentUser, type RouteDef } from '../http/route-table';
import { addPhoto, finishStep, getPhoto, getUnit, markBuilt, myBuilds, recordLots, recordReadings, startStep } from '../services/production/building';
import { cancelUnit } from '../services/production/stock';
import { benchQueue, recordTest } from '../services/production/testing';
import { idParam, PLANNERS } from './batches';

const STAFF: Role[] = ['owner', 'planner', 'assembler', 'tester'];
const PHOTO_MAX_BYTES = 8 * 1024 * 1024;

/** One optional file field, in memory, with a clear 413 / 400 instead of multer's own wording. */
function singleUpload(field: string, maxBytes: number, what: string): RequestHandler {
  const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: maxBytes, files: 1, fields: 20 } }).single(field);
  return (req, res, next) => upload(req, res, (error: unknown) => {
    if (!error) return next();
    const code = (error as { code?: string }).code;
    if (code === 'LIMIT_FILE_SIZE') return next(tooLarge(`The ${what} is larger than ${maxBytes / 1048576} MB`));
    if (code === 'LIMIT_UNEXPECTED_FILE') return next(invalid(`Send the ${what} in the “${field}” field`, { [field]: 'Unexpected file field' }));
    return next(invalid(`The ${what} upload could not be read`, { [field]: 'Upload failed' }));
  });
}

export function unitRoutes(knex: Knex, config: Pick<Config, 'publicUrl'>): RouteDef[] {
  return [
    { method: 'get', path: '/api/builds', allow: ['assembler'], handler: async (req, res) => res.json({ builds: await myBuilds(knex, currentUser(req).id) }) },
    { method: 'get', path: '/api/bench', allow: ['owner', 'planner', 'tester'], handler: async (_req, res) => res.json({ units: await benchQueue(knex) }) },
    { method: 'get', path: '/api/units/:id', allow: STAFF, handler: async (req, res) => res.json(await getUnit(knex, currentUser(req), idParam(req.params.id))) },
    {
      method: 'post', path: '/api/units/:id/steps/:stepId/start', allow: ['assembler'],
      handler: async (req, res) => res.json(await startStep(knex, currentUser(req), idParam(req.params.id), idParam(req.params.stepId, 'stepId'))),
    },
    {
      method: 'post', path: '/api/units/:id/steps/:stepId/finish', allow: ['assembler'],
      handler: async (req, res) => res.json(await finishStep(knex, currentUser(req), idParam(req.params.id), idParam(req.params.stepId, 'stepId'))),
    },
    {
      method: 'put', path: '/api/units/:id/devices', allow: ['assembler'],
      handler: async (req, res) => {
        const id = idParam(req.params.id);
        res.json(await recordReadings(knex, currentUser(req), id, parseWith(deviceReadingsSchema, req.body)));
      },
    },
    {
      method: 'put', path: '/api/units/:id/lots', allow: ['assembler'],
      handler: async (req, res) => {
        const id = idParam(req.params.id);
        res.json(await recordLots(knex, currentUser(req), id, parseWith(partLotsSchema, req.body)));
      },
    },
    {
      method: 'post', path: '/api/units/:id/photos', allow: ['assembler'], before: [singleUpload('photo', PHOTO_MAX_BYTES, 'photo')],
      handler: async (req, res) => {
        const id = idParam(req.params.id);
        res.status(201).json(await addPhoto(knex, currentUser(req), id, req.file, String(req.body?.caption ?? '')));
      },
    },
    {
      method: 'get', path: '/api/units/:id/photos/:photoId', allow: STAFF,
      handler: async (req, res) => {
        const photo = await getPhoto(knex, currentUser(req), idParam(req.params.id), idParam(req.params.photoId, 'photoId'));
        res.type(photo.content_type).send(photo.data);
      },
    },
    { method: 'post', path: '/api/units/:id/built', allow: ['assembler'], handler: async (req, res) => res.json(await markBuilt(knex, currentUser(req), idParam(req.params.id))) },
    {
      method: 'post', path: '/api/units/:id/cancel', allow: PLANNERS,
      handler: async (req, res) => {
        const id = idParam(req.params.id);
        res.json(await cancelUnit(knex, currentUser(req).id, id, parseWith(cancelSchema, req.body).reason));
      },
    },
    {
      method: 'post', path: '/api/units/:id/tests', allow: ['tester'], before: [singleUpload('capture', CAPTURE_LIMITS.maxBytes, 'WAV capture')],
      handler: async (req, res) => {
        const id = idParam(req.params.id);
        const input = parseWith(benchTestSchema, req.body);
        if (req.file && !/\.wav$/i.test(req.file.originalname) && !/wav/i.test(req.file.mimetype)) {
          throw invalid('The capture must be a WAV file', { capture: 'Only .wav files' });
        }
        res.status(201).json(await recordTest(knex, currentUser(req), id, input, req.file, config.publicUrl));
      },
    },
  ];
}
