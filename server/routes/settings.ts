import type { Knex } from 'knex';
import { settingsPatchSchema } from '../../shared/schemas/settings';
import { OWNER_ONLY } from '../../shared/roles';
import { notFound, parseWith } from '../errors';
import { currentUser, type RouteDef } from '../http/route-table';
import { singleUpload } from '../http/upload';
import * as settings from '../services/settings';

const logoUpload = singleUpload('logo', settings.LOGO_MAX_BYTES, 'logo');

export function settingsRoutes(knex: Knex): RouteDef[] {
  return [
    { method: 'get', path: '/api/settings/public', allow: 'public', handler: async (_req, res) => res.json(await settings.getPublicSettings(knex)) },
    { method: 'get', path: '/api/settings', allow: OWNER_ONLY, handler: async (_req, res) => res.json(await settings.getOwnerSettings(knex)) },
    {
      method: 'patch', path: '/api/settings', allow: OWNER_ONLY,
      handler: async (req, res) => res.json(await settings.updateSettings(knex, currentUser(req).id, parseWith(settingsPatchSchema, req.body))),
    },
    {
      method: 'get', path: '/api/settings/logo', allow: 'public',
      handler: async (_req, res) => {
        const logo = await settings.getLogo(knex);
        if (!logo) throw notFound('The shop has no logo');
        res.set('Content-Type', logo.contentType);
        res.set('Cache-Control', 'public, max-age=300');
        res.send(logo.data);
      },
    },
    { method: 'put', path: '/api/settings/logo', allow: OWNER_ONLY, before: [logoUpload], handler: async (req, res) => res.json(await settings.setLogo(knex, currentUser(req).id, req.file)) },
    { method: 'delete', path: '/api/settings/logo', allow: OWNER_ONLY, handler: async (req, res) => res.json(await settings.removeLogo(knex, currentUser(req).id)) },
  ];
}
