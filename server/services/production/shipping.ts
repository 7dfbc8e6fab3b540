import type { Knex } from 'knex';
import type { SessionUser } from '../../../shared/roles';
import { SHIPPING_STATES, type ShipmentListQuery, type ShippingListQuery, type ShipOrderInput } from '../../../shared/schemas/production';
import { containsPattern, paged } from '../../http/paged';
import type { OrderState } from '../../../shared/order-states';
import { conflict, invalid, notFound } from '../../errors';
import { orderMailData } from '../mail/order-mail';
import { enqueueMail } from '../mail/outbox';
import { transitionOrder } from '../orders/transitions';
import { trackingUrl } from '../../../shared/schemas/settings';
import { getCarrier, getCarriers, getSettings } from '../settings';
import { compute } from '../../compute/pool';
import { lockUnit, lockUnitWithBatch, transitionUnit } from './history';
import { lockBatchRow, lockUnitRows } from '../stock/ledger';
import { closeBatchIfDone, orderFullyPassed } from './testing';
import { inConstants } from '../../db/prepared';
import { lookupJoin } from '../../db/lookup-join';
import { paidLinesOutsideBatches } from './planning';

type Db = Knex | Knex.Transaction;

const SHIPPING_SORT: Record<ShippingListQuery['sort'], string> = { dueAt: 'o.due_at', number: 'o.id', state: 'o.state', customerName: 'u.name' };
const SHIPMENT_SORT: Record<ShipmentListQuery['sort'], string> = { shippedAt: 's.shipped_at', number: 'o.id', carrier: 's.carrier', customerName: 'u.name' };
interface Destination { ship_name: string; ship_city: string; ship_country: string }
interface ShippingRow extends Destination { id: number; number: string; state: OrderState; due_at: Date | null; customer_name: string; units: number; passed: number }
interface ShipmentRow extends Destination {
  id: number; order_id: number; number: string; state: OrderState; customer_name: string; carrier: string; tracking_number: string;
  shipped_at: Date; delivered_at: Date | null; packing_slip_file_id: number | null; tracking_url: string;
}
/** At most this many stock lines and stock builds come with the shipping page. */
const STOCK_LIST_LIMIT = 100;

/**
 * The shipping desk: one page of orders on their way (scheduled, in production, ready to ship),
 * the paid orders finished stock can fulfil, and the stock builds that passed. Shipped orders are
 * in `shipmentList`, so this never grows with the shop's history.
 */
export async function shippingQueue(db: Db, params: ShippingListQuery) {
  // Every order has its customer (a foreign key): the count looks customers up only to search their names.
  const base = (withCustomer = true) => {
    // The states are the enum's own words (checked by the schema), written into the SQL for the plan cache.
    const q = db('orders as o').where(inConstants(db, 'o.state', params.state ? [params.state] : [...SHIPPING_STATES]));
    if (withCustomer) q.joinRaw(lookupJoin(db, 'users', 'u', ['name'], 'o.customer_id'));
    if (params.q) { const like = containsPattern(params.q); q.where((w) => w.whereILike('o.number', like).orWhereILike('u.name', like).orWhereILike('o.ship_name', like)); }
    return q;
  };
  const orders = await paged(params, {
    count: base(Boolean(params.q)),
    rows: base().select('o.id', 'o.number', 'o.state', 'o.due_at', 'o.ship_name', 'o.ship_city', 'o.ship_country', 'u.name as customer_name')
      .select(db.raw("(SELECT COUNT(*)::int FROM units WHERE order_id = o.id AND state <> 'cancelled') AS units"))
      .select(db.raw("(SELECT COUNT(*)::int FROM units WHERE order_id = o.id AND state IN ('passed', 'shipped')) AS passed")),
    sortColumns: SHIPPING_SORT, tieBreak: 'o.id',
    map: (o: ShippingRow) => ({
      id: o.id, number: o.number, state: o.state, dueAt: o.due_at, customerName: o.customer_name,
      destination: `${o.ship_name}, ${o.ship_city} (${o.ship_country})`, units: o.units, passed: o.passed,
    }),
  });
  // Ordered quantities of this page's orders in one grouped query.
  const sums = orders.items.length
    ? await db('order_lines').whereIn('order_id', orders.items.map((o) => o.id)).groupBy('order_id').select('order_id', db.raw('SUM(quantity)::int AS ordered'))
    : [];
  const ordered = new Map(sums.map((r: { order_id: number; ordered: number }) => [r.order_id, r.ordered]));
  // Passed builds first (they wait for someone), then the newest stock: the newest of each state
  // come from the finished-stock index (migration 20261204160000), and only those are joined.
  const newest = (state: 'passed' | 'in_stock') => db('units').where(inConstants(db, 'state', [state])).whereNull('order_id')
    .select('id', 'serial', 'state', 'option_id', 'batch_id').orderBy('id', 'desc').limit(STOCK_LIST_LIMIT, { skipBinding: true });
  const stock = await db.from(db.unionAll([newest('passed'), newest('in_stock')], true).as('u'))
    .join('clipping_options as c', 'c.id', 'u.option_id').join('batches as b', 'b.id', 'u.batch_id')
    .join('model_revisions as r', 'r.id', 'b.revision_id').join('models as m', 'm.id', 'r.model_id')
    .select('u.id', 'u.serial', 'u.state', 'm.name as model_name', 'c.name as option_name')
    .orderByRaw("u.state = 'passed' DESC, u.id DESC").limit(STOCK_LIST_LIMIT, { skipBinding: true });
  // Paid lines that finished stock can fill now. Each line counts its option's unsold units only up
  // to its own quantity (migration 20261205210000), so stock on the shelf costs nothing.
  const fromStock = await paidLinesOutsideBatches(db).whereNotNull('l.option_id')
    .whereRaw(`(SELECT count(*) FROM (SELECT 1 FROM units s WHERE s.option_id = l.option_id AND s.state = 'in_stock'
      AND s.order_id IS NULL LIMIT l.quantity) AS enough) >= l.quantity`)
    .select('l.id', 'l.quantity', 'l.description', 'o.number').orderBy('l.id').limit(STOCK_LIST_LIMIT, { skipBinding: true });
  return {
    orders: { ...orders, items: orders.items.map((o) => ({ ...o, ordered: ordered.get(o.id) ?? 0 })) },
    fromStock: fromStock.map((l) => ({ orderLineId: l.id, orderNumber: l.number, quantity: l.quantity, description: l.description })),
    finishedStock: stock.map((u) => ({ id: u.id, serial: u.serial, state: u.state, modelName: u.model_name, optionName: u.option_name })),
  };
}

/** Shipments, one page at a time: newest first unless asked otherwise; `delivered` filters. */
export async function shipmentList(db: Db, params: ShipmentListQuery) {
  // Every shipment has its order and customer (foreign keys), so the count joins them only to search.
  const base = (joined = true) => {
    const q = db('shipments as s');
    if (joined) q.join('orders as o', 'o.id', 's.order_id').join('users as u', 'u.id', 'o.customer_id');
    if (params.delivered === true) q.whereNotNull('s.delivered_at');
    if (params.delivered === false) q.whereNull('s.delivered_at');
    if (params.q) { const like = containsPattern(params.q); q.where((w) => w.whereILike('o.number', like).orWhereILike('u.name', like).orWhereILike('s.tracking_number', like)); }
    return q;
  };
  return paged(params, {
    count: base(Boolean(params.q)),
    rows: base().select('s.id', 's.carrier', 's.tracking_number', 's.tracking_url', 's.shipped_at', 's.delivered_at', 's.packing_slip_file_id', 'o.id as order_id', 'o.number', 'o.state', 'u.name as customer_name',
      'o.ship_name', 'o.ship_city', 'o.ship_country'),
    sortColumns: SHIPMENT_SORT, tieBreak: 's.id',
    map: (s: ShipmentRow) => ({
      id: s.id, orderId: s.order_id, orderNumber: s.number, orderState: s.state, customerName: s.customer_name,
      destination: `${s.ship_name}, ${s.ship_city} (${s.ship_country})`, carrier: s.carrier, trackingNumber: s.tracking_number, trackingUrl: s.tracking_url || null,
      shippedAt: s.shipped_at, deliveredAt: s.delivered_at,
      packingSlipUrl: s.packing_slip_file_id ? `/api/shipments/${s.id}/packing-slip.pdf` : null,
    }),
  });
}

/**
 * Ships an order: only when every unit has passed. The carrier is one of the settings' active
 * carriers; its tracking link is made from the carrier's template now and kept with the shipment.
 * Records the shipment, prints the packing slip, queues the mail with the tracking link.
 */
export async function shipOrder(knex: Knex, user: SessionUser, input: ShipOrderInput, publicUrl = '') {
  const carrier = await getCarrier(knex, input.carrierId).catch(() => null);
  if (!carrier || !carrier.active) throw invalid('Choose one of the carriers in the settings', { carrierId: 'Choose one of the carriers in the settings' });
  const link = trackingUrl(carrier.trackingUrlTemplate, input.trackingNumber);
  return knex.transaction(async (trx) => {
    const order = await trx('orders as o').join('users as u', 'u.id', 'o.customer_id').where('o.id', input.orderId).forUpdate('o').select('o.*', 'u.email', 'u.name as customer_name').first();
    if (!order) throw notFound('No such order');
    if (!(await orderFullyPassed(trx, order.id)) || !['ready'].includes(order.state)) {
      throw conflict(`Order ${order.number} cannot ship yet: every unit must have passed its bench test`);
    }
    const units = await trx('units as u').join('clipping_options as c', 'c.id', 'u.option_id').join('batches as b', 'b.id', 'u.batch_id')
      .join('model_revisions as r', 'r.id', 'b.revision_id').join('models as m', 'm.id', 'r.model_id')
      .where('u.order_id', order.id).where('u.state', 'passed').select('u.id', 'u.serial', 'u.batch_id', 'm.name as model_name', 'c.name as option_name', 'r.supply_v').orderBy('u.serial');
    // The ledger's lock order: the batches (a pass may close them), then the units.
    for (const batchId of [...new Set(units.map((u) => u.batch_id as number))].sort((a, b) => a - b)) await lockBatchRow(trx, batchId);
    await lockUnitRows(trx, units.map((u) => u.id));
    const [shipment] = await trx('shipments').insert({
      order_id: order.id, carrier: carrier.name, carrier_id: carrier.id, tracking_number: input.trackingNumber, tracking_url: link, shipped_by: user.id,
    }).returning('*');
    for (const u of units) {
      const unit = await lockUnit(trx, u.id);
      await transitionUnit(trx, unit, 'shipped', user.id, `shipped with ${carrier.name} ${input.trackingNumber}`, { shipment_id: shipment.id });
    }
    const settings = await getSettings(trx);
    const pdf = await compute.packingSlipPdf({ settings, order, shipment, units });
    const [file] = await trx('files').insert({ purpose: 'packing-slip', filename: `packing-slip-${order.number}.pdf`, content_type: 'application/pdf', size_bytes: pdf.length, data: pdf, uploaded_by: user.id }).returning('id');
    await trx('shipments').where({ id: shipment.id }).update({ packing_slip_file_id: file.id });
    await transitionOrder(trx, order.id, 'shipped', { userId: user.id, message: `shipped with ${carrier.name}, tracking ${input.trackingNumber}` });
    const base = await orderMailData(trx, order.id, publicUrl);
    await enqueueMail(trx, {
      dedupeKey: `order-shipped:${order.id}`, template: 'order-shipped', to: base.to,
      data: { ...base.data, carrier: carrier.name, tracking: input.trackingNumber, trackingNumber: input.trackingNumber, trackingUrl: link, serials: units.map((u) => u.serial) },
    });
    for (const batchId of new Set(units.map((u) => u.batch_id))) await closeBatchIfDone(trx, batchId);
    return { id: shipment.id as number, orderState: 'shipped' as const, packingSlipUrl: `/api/shipments/${shipment.id}/packing-slip.pdf` };
  });
}

/** The carriers shipping may choose from (the settings' active ones, in the owner's order). */
export const shippingCarriers = (db: Db) => getCarriers(db, { activeOnly: true });

/** The customer confirmed delivery (or the carrier did): shipped → delivered. */
export async function markDelivered(knex: Knex, user: SessionUser, shipmentId: number) {
  return knex.transaction(async (trx) => {
    const shipment = await trx('shipments').where({ id: shipmentId }).forUpdate().first();
    if (!shipment) throw notFound('No such shipment');
    if (shipment.delivered_at) throw conflict('This shipment is already marked delivered');
    await transitionOrder(trx, shipment.order_id, 'delivered', { userId: user.id, message: 'delivery confirmed' });
    await trx('shipments').where({ id: shipmentId }).update({ delivered_at: trx.fn.now() });
    return { id: shipmentId, orderState: 'delivered' as const };
  });
}

/** A passed unit built for stock goes to finished stock, to fulfil a later order of the same model and option. */
export async function moveToFinishedStock(knex: Knex, user: SessionUser, unitId: number) {
  return knex.transaction(async (trx) => {
    const { unit } = await lockUnitWithBatch(trx, unitId);
    if (unit.order_id) throw conflict(`Unit ${unit.serial} belongs to an order: ship it with that order`);
    await transitionUnit(trx, unit, 'in_stock', user.id, 'into finished stock');
    await closeBatchIfDone(trx, unit.batch_id);
    return { id: unitId, state: unit.state };
  });
}

/**
 * Fulfils a paid order line from finished stock: needs as many in-stock units of the same option
 * as the line's quantity. The units join the order (passed again, ready to pack), the line counts
 * as scheduled, and the order moves on once all its lines are covered: scheduled, then building
 * and ready when every unit has passed.
 */
export async function fulfilFromStock(knex: Knex, user: SessionUser, orderLineId: number) {
  return knex.transaction(async (trx) => {
    const line = await trx('order_lines').where({ id: orderLineId }).forUpdate().first();
    if (!line) throw notFound('No such order line');
    const order = await trx('orders').where({ id: line.order_id }).forUpdate().first();
    if (order.state !== 'paid' || line.batch_id) throw conflict(`Order ${order.number} is not paid and waiting: it cannot take stock`);
    const units = await trx('units').where({ option_id: line.option_id, state: 'in_stock' }).whereNull('order_id').orderBy('serial').limit(line.quantity).forUpdate();
    if (units.length < line.quantity) throw conflict(`Finished stock holds ${units.length} of the ${line.quantity} needed for this line`);
    for (const u of units) {
      await transitionUnit(trx, u, 'passed', user.id, `taken from finished stock for order ${order.number}`, { order_id: order.id });
    }
    await trx('order_lines').where({ id: line.id }).update({ batch_id: units[0].batch_id });
    const open = await trx('order_lines').where({ order_id: order.id }).whereNull('batch_id').first();
    if (!open) {
      await transitionOrder(trx, order.id, 'scheduled', { userId: user.id, message: 'fulfilled from finished stock' });
      if (await orderFullyPassed(trx, order.id)) {
        await transitionOrder(trx, order.id, 'in_production', { userId: user.id, message: 'units taken from finished stock' });
        await transitionOrder(trx, order.id, 'ready', { userId: user.id, message: 'every unit passed its bench test' });
      }
    }
    const updated = await trx('orders').where({ id: order.id }).first('state');
    return { orderState: updated.state as string, serials: units.map((u) => u.serial as string) };
  });
}

export async function packingSlip(db: Db, shipmentId: number) {
  const row = await db('shipments as s').join('files as f', 'f.id', 's.packing_slip_file_id').where('s.id', shipmentId).select('f.filename', 'f.data').first();
  if (!row) throw notFound('No packing slip for this shipment');
  return row as { filename: string; data: Buffer };
}
