import type { Knex } from 'knex';
import type { Request } from 'express';
import multer from 'multer';
import { STAFF_ROLES, type SessionUser } from '../../shared/roles';
import {
  BOM_CSV_MAX_BYTES, PHOTO_MAX_BYTES, bomLineSchema, buildStepSchema, driveStageSchema, modelSchema, modelUpdateSchema, optionSchema, optionUpdateSchema,
} from '../../shared/schemas/catalog';
import { invalid, parseWith } from '../errors';
import { currentUser, type RouteDef } from '../http/route-table';
import { addBomLine, checkBomCsv, deleteBomLine, importBomCsv, updateBomLine } from '../services/catalog/bom';
import { getModel, getModelPhoto, listModels } from '../services/catalog/models-read';
import { createModel, createOption, setModelPhoto, updateModel, updateOption } from '../services/catalog/models-write';
import { activateRevision, getRevision, startRevisionFrom, updateRevision } from '../services/catalog/revisions';
import { addStep, deleteStep, updateStep } from '../services/catalog/steps';

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

const EDITORS = ['owner', 'planner'] as const;
const STAFF = ['owner', 'planner', 'assembler', 'tester'] as const;
// Uploads stay in memory (small caps) and go to PostgreSQL; over the cap multer fails with LIMIT_FILE_SIZE → 413.
const csvUpload = multer({ storage: multer.memoryStorage(), limits: { fileSize: BOM_CSV_MAX_BYTES, files: 1 } }).single('file');
const photoUpload = multer({ storage: multer.memoryStorage(), limits: { fileSize: PHOTO_MAX_BYTES, files: 1 } }).single('photo');

export function modelRoutes(knex: Knex): RouteDef[] {
  const model = async (req: Request, id: number) => ({ model: await getModel(knex, id, isStaff(req)) });
  return [
    { method: 'get', path: '/api/models', allow: 'public', handler: async (req, res) => res.json({ models: await listModels(knex, isStaff(req)) }) },
    { method: 'post', path: '/api/models', allow: EDITORS, handler: async (req, res) => res.status(201).json(await model(req, await createModel(knex, parseWith(modelSchema, req.body)))) },
    { method: 'get', path: '/api/models/:id', allow: 'public', handler: async (req, res) => res.json(await model(req, idParam(req.params.id))) },
    {
      method: 'patch', path: '/api/models/:id', allow: EDITORS,
      handler: async (req, res) => { const id = idParam(req.params.id); await updateModel(knex, id, parseWith(modelUpdateSchema, req.body)); res.json(await model(req, id)); },
    },
    {
      method: 'get', path: '/api/models/:id/photo', allow: 'public',
      handler: async (req, res) => {
        const photo = await getModelPhoto(knex, idParam(req.params.id), isStaff(req));
        res.set('Content-Type', photo.content_type);
        res.set('Cache-Control', 'public, max-age=3600');
        res.send(photo.data);
      },
    },
    {
      method: 'put', path: '/api/models/:id/photo', allow: EDITORS, before: [photoUpload],
      handler: async (req, res) => { const id = idParam(req.params.id); await setModelPhoto(knex, id, req.file, currentUser(req).id); res.json(await model(req, id)); },
    },
    {
      method: 'post', path: '/api/models/:id/revisions', allow: EDITORS,
      handler: async (req, res) => res.status(201).json({ revision: await startRevisionFrom(knex, idParam(req.params.id), idParam(req.body?.fromRevisionId, 'fromRevisionId')) }),
    },
    {
      method: 'post', path: '/api/models/:id/options', allow: EDITORS,
      handler: async (req, res) => { const id = idParam(req.params.id); const optionId = await createOption(knex, id, parseWith(optionSchema, req.body)); res.status(201).json({ optionId, ...(await model(req, id)) }); },
    },
    {
      method: 'patch', path: '/api/options/:id', allow: EDITORS,
      handler: async (req, res) => res.json(await model(req, await updateOption(knex, idParam(req.params.id), parseWith(optionUpdateSchema, req.body)))),
    },
    { method: 'get', path: '/api/revisions/:id', allow: STAFF, handler: async (req, res) => res.json({ revision: await getRevision(knex, idParam(req.params.id)) }) },
    { method: 'patch', path: '/api/revisions/:id', allow: EDITORS, handler: async (req, res) => res.json({ revision: await updateRevision(knex, idParam(req.params.id), parseWith(driveStageSchema, req.body)) }) },
    { method: 'post', path: '/api/revisions/:id/activate', allow: EDITORS, handler: async (req, res) => res.json({ revision: await activateRevision(knex, idParam(req.params.id)) }) },
    { method: 'post', path: '/api/revisions/:id/bom-lines', allow: EDITORS, handler: async (req, res) => res.status(201).json({ revision: await addBomLine(knex, idParam(req.params.id), parseWith(bomLineSchema, req.body)) }) },
    { method: 'patch', path: '/api/bom-lines/:id', allow: EDITORS, handler: async (req, res) => res.json({ revision: await updateBomLine(knex, idParam(req.params.id), parseWith(bomLineSchema, req.body)) }) },
    { method: 'delete', path: '/api/bom-lines/:id', allow: EDITORS, handler: async (req, res) => res.json({ revision: await deleteBomLine(knex, idParam(req.params.id)) }) },
    {
      method: 'post', path: '/api/revisions/:id/bom-csv/preview', allow: EDITORS, before: [csvUpload],
      handler: async (req, res) => { idParam(req.params.id); res.json(await checkBomCsv(knex, req.file?.buffer)); },
    },
    {
      method: 'post', path: '/api/revisions/:id/bom-csv/import', allow: EDITORS, before: [csvUpload],
      handler: async (req, res) => res.json({ revision: await importBomCsv(knex, idParam(req.params.id), req.file?.buffer) }),
    },
    { method: 'post', path: '/api/revisions/:id/steps', allow: EDITORS, handler: async (req, res) => res.status(201).json({ revision: await addStep(knex, idParam(req.params.id), parseWith(buildStepSchema, req.body)) }) },
    { method: 'patch', path: '/api/steps/:id', allow: EDITORS, handler: async (req, res) => res.json({ revision: await updateStep(knex, idParam(req.params.id), parseWith(buildStepSchema, req.body)) }) },
    { method: 'delete', path: '/api/steps/:id', allow: EDITORS, handler: async (req, res) => res.json({ revision: await deleteStep(knex, idParam(req.params.id)) }) },
  ];
}
