import type { Knex } from 'knex';
import type { Request } from 'express';
import { PLANNING, STAFF } from '../../shared/roles';
import {
  BOM_CSV_MAX_BYTES, PHOTO_MAX_BYTES, bomLineSchema, newRevisionSchema, buildStepSchema, driveStageSchema, modelSchema, modelUpdateSchema, optionSchema, optionUpdateSchema,
} from '../../shared/schemas/catalog';
import { parseWith } from '../errors';
import { pathId } from '../http/params';
import { singleUpload } from '../http/upload';
import { currentUser, isStaffRequest, type RouteDef } from '../http/route-table';
import { addBomLine, checkBomCsv, deleteBomLine, importBomCsv, updateBomLine } from '../services/catalog/bom';
import { getModel, getModelPhoto, listModels } from '../services/catalog/models-read';
import { createModel, createOption, setModelPhoto, updateModel, updateOption } from '../services/catalog/models-write';
import { activateRevision, getRevision, startRevisionFrom, updateRevision } from '../services/catalog/revisions';
import { addStep, deleteStep, updateStep } from '../services/catalog/steps';

const isStaff = isStaffRequest;
const csvUpload = singleUpload('file', BOM_CSV_MAX_BYTES, 'BOM CSV');
const photoUpload = singleUpload('photo', PHOTO_MAX_BYTES, 'photo');

export function modelRoutes(knex: Knex): RouteDef[] {
  const model = async (req: Request, id: number) => ({ model: await getModel(knex, id, isStaff(req)) });
  return [
    { method: 'get', path: '/api/models', allow: 'public', cache: true, handler: async (req, res) => res.json({ models: await listModels(knex, isStaff(req)) }) },
    { method: 'post', path: '/api/models', allow: PLANNING, handler: async (req, res) => res.status(201).json(await model(req, await createModel(knex, parseWith(modelSchema, req.body)))) },
    { method: 'get', path: '/api/models/:id', allow: 'public', cache: true, handler: async (req, res) => res.json(await model(req, pathId(req, 'id', 'model'))) },
    {
      method: 'patch', path: '/api/models/:id', allow: PLANNING,
      handler: async (req, res) => { const id = pathId(req, 'id', 'model'); await updateModel(knex, id, parseWith(modelUpdateSchema, req.body)); res.json(await model(req, id)); },
    },
    {
      method: 'get', path: '/api/models/:id/photo', allow: 'public',
      handler: async (req, res) => {
        const photo = await getModelPhoto(knex, pathId(req, 'id', 'model'), isStaff(req));
        res.set('Content-Type', photo.content_type);
        res.set('Cache-Control', 'public, max-age=3600');
        res.send(photo.data);
      },
    },
    {
      method: 'put', path: '/api/models/:id/photo', allow: PLANNING, before: [photoUpload],
      handler: async (req, res) => { const id = pathId(req, 'id', 'model'); await setModelPhoto(knex, id, req.file, currentUser(req).id); res.json(await model(req, id)); },
    },
    {
      method: 'post', path: '/api/models/:id/revisions', allow: PLANNING,
      handler: async (req, res) => res.status(201).json({ revision: await startRevisionFrom(knex, pathId(req, 'id', 'model'), parseWith(newRevisionSchema, req.body).fromRevisionId) }),
    },
    {
      method: 'post', path: '/api/models/:id/options', allow: PLANNING,
      handler: async (req, res) => { const id = pathId(req, 'id', 'model'); const optionId = await createOption(knex, id, parseWith(optionSchema, req.body)); res.status(201).json({ optionId, ...(await model(req, id)) }); },
    },
    {
      method: 'patch', path: '/api/options/:id', allow: PLANNING,
      handler: async (req, res) => res.json(await model(req, await updateOption(knex, pathId(req, 'id', 'option'), parseWith(optionUpdateSchema, req.body)))),
    },
    { method: 'get', path: '/api/revisions/:id', allow: STAFF, cache: true, handler: async (req, res) => res.json({ revision: await getRevision(knex, pathId(req, 'id', 'revision')) }) },
    { method: 'patch', path: '/api/revisions/:id', allow: PLANNING, handler: async (req, res) => res.json({ revision: await updateRevision(knex, pathId(req, 'id', 'revision'), parseWith(driveStageSchema, req.body)) }) },
    { method: 'post', path: '/api/revisions/:id/activate', allow: PLANNING, handler: async (req, res) => res.json({ revision: await activateRevision(knex, pathId(req, 'id', 'revision')) }) },
    { method: 'post', path: '/api/revisions/:id/bom-lines', allow: PLANNING, handler: async (req, res) => res.status(201).json({ revision: await addBomLine(knex, pathId(req, 'id', 'revision'), parseWith(bomLineSchema, req.body)) }) },
    { method: 'patch', path: '/api/bom-lines/:id', allow: PLANNING, handler: async (req, res) => res.json({ revision: await updateBomLine(knex, pathId(req, 'id', 'revision'), parseWith(bomLineSchema, req.body)) }) },
    { method: 'delete', path: '/api/bom-lines/:id', allow: PLANNING, handler: async (req, res) => res.json({ revision: await deleteBomLine(knex, pathId(req, 'id', 'BOM line')) }) },
    {
      method: 'post', path: '/api/revisions/:id/bom-csv/preview', allow: PLANNING, before: [csvUpload],
      handler: async (req, res) => { pathId(req, 'id', 'revision'); res.json(await checkBomCsv(knex, req.file?.buffer)); },
    },
    {
      method: 'post', path: '/api/revisions/:id/bom-csv/import', allow: PLANNING, before: [csvUpload],
      handler: async (req, res) => res.json({ revision: await importBomCsv(knex, pathId(req, 'id', 'revision'), req.file?.buffer) }),
    },
    { method: 'post', path: '/api/revisions/:id/steps', allow: PLANNING, handler: async (req, res) => res.status(201).json({ revision: await addStep(knex, pathId(req, 'id', 'revision'), parseWith(buildStepSchema, req.body)) }) },
    { method: 'patch', path: '/api/steps/:id', allow: PLANNING, handler: async (req, res) => res.json({ revision: await updateStep(knex, pathId(req, 'id', 'revision'), parseWith(buildStepSchema, req.body)) }) },
    { method: 'delete', path: '/api/steps/:id', allow: PLANNING, handler: async (req, res) => res.json({ revision: await deleteStep(knex, pathId(req, 'id', 'step')) }) },
  ];
}
