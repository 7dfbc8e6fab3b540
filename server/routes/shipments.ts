import type { Knex } from 'knex';
import type { Config } from '../config';
import { addressLabelQuerySchema, shipmentListSchema, shippingListSchema, shipOrderSchema } from '../../shared/schemas/production';
import { parseWith } from '../errors';
import { currentUser, type RouteDef } from '../http/route-table';
import { fulfilFromStock, markDelivered, moveToFinishedStock, packingSlip, shipmentList, shipOrder, shippingCarriers, shippingQueue } from '../services/production/shipping';
import { PLANNING } from '../../shared/roles';
import { addressLabel, orderPackingSlip, serialLabels } from '../services/production/labels';
import type { Response } from 'express';
import { pathId } from '../http/params';

/** Sends a PDF to open in the browser's viewer (and print from there). */
function sendPdf(res: Response, pdf: { filename: string; data: Buffer }) {
  res.type('application/pdf').setHeader('Content-Disposition', `inline; filename="${pdf.filename}"`);
  res.send(pdf.data);
}

export function shipmentRoutes(knex: Knex, config: Pick<Config, 'publicUrl'>): RouteDef[] {
  return [
    { method: 'get', path: '/api/shipping', allow: PLANNING, cache: true, handler: async (req, res) => res.json(await shippingQueue(knex, parseWith(shippingListSchema, req.query))) },
    { method: 'get', path: '/api/carriers', allow: PLANNING, cache: true, handler: async (_req, res) => res.json({ carriers: await shippingCarriers(knex) }) },
    { method: 'get', path: '/api/shipments', allow: PLANNING, cache: true, handler: async (req, res) => res.json(await shipmentList(knex, parseWith(shipmentListSchema, req.query))) },
    { method: 'post', path: '/api/shipments', allow: PLANNING, handler: async (req, res) => res.status(201).json(await shipOrder(knex, currentUser(req), parseWith(shipOrderSchema, req.body), config.publicUrl)) },
    {
      method: 'get', path: '/api/shipments/:id/packing-slip.pdf', allow: PLANNING,
      handler: async (req, res) => {
        const slip = await packingSlip(knex, pathId(req, 'id', 'shipment'));
        res.type('application/pdf').setHeader('Content-Disposition', `inline; filename="${slip.filename}"`);
        res.send(slip.data);
      },
    },
    // Printing at the packing bench: slip and address label once the order is ready; serial labels once a batch has units.
    { method: 'get', path: '/api/orders/:id/packing-slip.pdf', allow: PLANNING, handler: async (req, res) => sendPdf(res, await orderPackingSlip(knex, pathId(req, 'id', 'order'))) },
    {
      method: 'get', path: '/api/orders/:id/address-label.pdf', allow: PLANNING,
      handler: async (req, res) => {
        const id = pathId(req, 'id', 'order');
        sendPdf(res, await addressLabel(knex, id, parseWith(addressLabelQuerySchema, req.query).size));
      },
    },
    { method: 'get', path: '/api/batches/:id/serial-labels.pdf', allow: PLANNING, handler: async (req, res) => sendPdf(res, await serialLabels(knex, pathId(req, 'id', 'batch'), config.publicUrl)) },
    { method: 'post', path: '/api/shipments/:id/delivered', allow: PLANNING, handler: async (req, res) => res.json(await markDelivered(knex, currentUser(req), pathId(req, 'id', 'shipment'))) },
    { method: 'post', path: '/api/order-lines/:id/from-stock', allow: PLANNING, handler: async (req, res) => res.json(await fulfilFromStock(knex, currentUser(req), pathId(req, 'id', 'order line'))) },
    { method: 'post', path: '/api/units/:id/finished-stock', allow: PLANNING, handler: async (req, res) => res.json(await moveToFinishedStock(knex, currentUser(req), pathId(req, 'id', 'unit'))) },
  ];
}
