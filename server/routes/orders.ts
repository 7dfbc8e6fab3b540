import type { Knex } from 'knex';
import type { Request } from 'express';
import { z } from 'zod';
import { text } from '../../shared/schemas/common';
import type { Config } from '../config';
import { markDeliveredSchema, myOrdersSchema, orderFilterSchema, orderNoteSchema, placeOrderSchema } from '../../shared/schemas/orders';
import { CUSTOMERS, ORDER_CANCELLERS, PLANNING } from '../../shared/roles';
import { parseWith } from '../errors';
import { pathId } from '../http/params';
import { currentUser, type RouteDef } from '../http/route-table';
import { documentPdf } from '../services/orders/invoices';
import * as orders from '../services/orders/orders';
import { cancelOrder } from '../services/payments/cancel';
import { startCheckout } from '../services/payments/checkout';
import { createPaymentsClient } from '../services/payments/client';

const cancelSchema = z.object({ reason: text(300).default('') });

/** An order id from the path; anything but a valid id is simply not an order (404). */
const orderId = (req: Request) => pathId(req, 'id', 'order');

export function orderRoutes(knex: Knex, config: Config): RouteDef[] {
  const payments = { stripe: createPaymentsClient(config), config };
  return [
    { method: 'get', path: '/api/orders/mine', allow: CUSTOMERS, cache: true, handler: async (req, res) => res.json(await orders.myOrders(knex, currentUser(req), parseWith(myOrdersSchema, req.query))) },
    {
      method: 'post', path: '/api/orders', allow: CUSTOMERS,
      handler: async (req, res) => {
        const order = await orders.placeOrder(knex, currentUser(req), parseWith(placeOrderSchema, req.body));
        res.status(201).json(await orders.orderDetail(knex, currentUser(req), order.id));
      },
    },
    { method: 'get', path: '/api/orders', allow: PLANNING, cache: true, handler: async (req, res) => res.json(await orders.listOrders(knex, parseWith(orderFilterSchema, req.query))) },
    {
      // The same filters and sort as the list, every matching order (page and pageSize are ignored).
      method: 'get', path: '/api/orders/export.csv', allow: PLANNING,
      handler: async (req, res) => {
        const body = await orders.ordersCsv(knex, parseWith(orderFilterSchema, req.query));
        res.set('Content-Type', 'text/csv; charset=utf-8').set('Content-Disposition', 'attachment; filename="orders.csv"').send(body);
      },
    },
    // Customers reach only their own orders (someone else's answers 404); order staff reach all.
    { method: 'get', path: '/api/orders/:id', allow: 'signed-in', cache: true, handler: async (req, res) => res.json(await orders.orderDetail(knex, currentUser(req), orderId(req))) },
    { method: 'post', path: '/api/orders/:id/checkout', allow: CUSTOMERS, handler: async (req, res) => res.json(await startCheckout(knex, payments, currentUser(req), orderId(req))) },
    {
      method: 'post', path: '/api/orders/:id/cancel', allow: ORDER_CANCELLERS,
      handler: async (req, res) => {
        const { reason } = parseWith(cancelSchema, req.body);
        const result = await cancelOrder(knex, payments, currentUser(req), orderId(req), reason);
        res.json({ ...result, ...(await orders.orderDetail(knex, currentUser(req), orderId(req))) });
      },
    },
    {
      method: 'post', path: '/api/orders/:id/notes', allow: PLANNING,
      handler: async (req, res) => {
        await orders.addStaffNote(knex, currentUser(req), orderId(req), parseWith(orderNoteSchema, req.body).note);
        res.status(201).json(await orders.orderDetail(knex, currentUser(req), orderId(req)));
      },
    },
    {
      method: 'post', path: '/api/orders/:id/delivered', allow: PLANNING,
      handler: async (req, res) => {
        await orders.markDelivered(knex, currentUser(req), orderId(req), parseWith(markDeliveredSchema, req.body).message);
        res.json(await orders.orderDetail(knex, currentUser(req), orderId(req)));
      },
    },
    {
      // An invoice or credit note: its order's customer, or order staff (anyone else: 404).
      method: 'get', path: '/api/invoices/:id/pdf', allow: 'signed-in',
      handler: async (req, res) => {
        const pdf = await documentPdf(knex, currentUser(req), pathId(req, 'id', 'document'));
        res.set('Content-Type', 'application/pdf');
        res.set('Content-Disposition', `inline; filename="${pdf.filename}"`);
        res.send(pdf.data);
      },
    },
  ];
}
