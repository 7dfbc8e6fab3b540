import type { Knex } from 'knex';
import { customDeviceSchema, deviceLinkSchema } from '../../shared/schemas/catalog';
import { parseWith } from '../errors';
import type { RouteDef } from '../http/route-table';
import { createDevice, getDevice, linkDevicePart, listDevices } from '../services/catalog/devices';
import { idParam } from './models';

const STAFF = ['owner', 'planner', 'assembler', 'tester'] as const;
const EDITORS = ['owner', 'planner'] as const;

export function deviceRoutes(knex: Knex): RouteDef[] {
  return [
    { method: 'get', path: '/api/devices', allow: STAFF, handler: async (_req, res) => res.json({ devices: await listDevices(knex) }) },
    { method: 'post', path: '/api/devices', allow: EDITORS, handler: async (req, res) => res.status(201).json({ device: await createDevice(knex, parseWith(customDeviceSchema, req.body)) }) },
    { method: 'get', path: '/api/devices/:id', allow: STAFF, handler: async (req, res) => res.json({ device: await getDevice(knex, idParam(req.params.id)) }) },
    {
      method: 'patch', path: '/api/devices/:id/part', allow: EDITORS,
      handler: async (req, res) => res.json({ device: await linkDevicePart(knex, idParam(req.params.id), parseWith(deviceLinkSchema, req.body).partId) }),
    },
  ];
}
