import type { Knex } from 'knex';
import type { Config } from '../config';
import { shipmentListSchema, shippingListSchema, shipOrderSchema } from '../../shared/schemas/production';
import { parseWith } from '../errors';
import { currentUser, type RouteDef } from '../http/route-table';
import { fulfilFromStock, markDelivered, moveToFinishedStock, packingSlip, shipmentList, shipOrder, shippingQueue } from '../services/production/shipping';
import { PLANNING } from '../../shared/roles';
import { pathId } from '../http/params';

export function shipmentRoutes(knex: Knex, config: Pick<Config, 'publicUrl'>): RouteDef[] {
  return [
    { method: 'get', path: '/api/shipping', allow: PLANNING, handler: async (req, res) => res.json(await shippingQueue(knex, parseWith(shippingListSchema, req.query))) },
    { method: 'get', path: '/api/shipments', allow: PLANNING, handler: async (req, res) => res.json(await shipmentList(knex, parseWith(shipmentListSchema, req.query))) },
    { method: 'post', path: '/api/shipments', allow: PLANNING, handler: async (req, res) => res.status(201).json(await shipOrder(knex, currentUser(req), parseWith(shipOrderSchema, req.body), config.publicUrl)) },
    {
      method: 'get', path: '/api/shipments/:id/packing-slip.pdf', allow: PLANNING,
      handler: async (req, res) => {
        const slip = await packingSlip(knex, pathId(req, 'id', 'shipment'));
        res.type('application/pdf').setHeader('Content-Disposition', `inline; filename="${slip.filename}"`);
        res.send(slip.data);
      },
    },
    { method: 'post', path: '/api/shipments/:id/delivered', allow: PLANNING, handler: async (req, res) => res.json(await markDelivered(knex, currentUser(req), pathId(req, 'id', 'shipment'))) },
    { method: 'post', path: '/api/order-lines/:id/from-stock', allow: PLANNING, handler: async (req, res) => res.json(await fulfilFromStock(knex, currentUser(req), pathId(req, 'id', 'order line'))) },
    { method: 'post', path: '/api/units/:id/finished-stock', allow: PLANNING, handler: async (req, res) => res.json(await moveToFinishedStock(knex, currentUser(req), pathId(req, 'id', 'unit'))) },
  ];
}
