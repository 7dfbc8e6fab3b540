import type { Knex } from 'knex';
import { customDeviceSchema, deviceLinkSchema } from '../../shared/schemas/catalog';
import { parseWith } from '../errors';
import type { RouteDef } from '../http/route-table';
import { createDevice, getDevice, linkDevicePart, listDevices } from '../services/catalog/devices';
import { pathId } from '../http/params';
import { PLANNING, STAFF } from '../../shared/roles';

export function deviceRoutes(knex: Knex): RouteDef[] {
  return [
    { method: 'get', path: '/api/devices', allow: STAFF, cache: true, handler: async (_req, res) => res.json({ devices: await listDevices(knex) }) },
    { method: 'post', path: '/api/devices', allow: PLANNING, handler: async (req, res) => res.status(201).json({ device: await createDevice(knex, parseWith(customDeviceSchema, req.body)) }) },
    { method: 'get', path: '/api/devices/:id', allow: STAFF, cache: true, handler: async (req, res) => res.json({ device: await getDevice(knex, pathId(req, 'id', 'device')) }) },
    {
      method: 'patch', path: '/api/devices/:id/part', allow: PLANNING,
      handler: async (req, res) => res.json({ device: await linkDevicePart(knex, pathId(req, 'id', 'device'), parseWith(deviceLinkSchema, req.body).partId) }),
    },
  ];
}
