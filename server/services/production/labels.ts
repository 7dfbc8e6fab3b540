// What the packing bench prints: the packing slip as soon as an order is ready (the stored one once
// it shipped), the parcel's address label, and a batch's serial labels. PDFs are drawn in the
// compute pool; this file only gathers the rows and checks the order's or batch's state.
import type { Knex } from 'knex';
import type { OrderState } from '../../../shared/order-states';
import { compute } from '../../compute/pool';
import { conflict, notFound } from '../../errors';
import type { AddressLabelSize } from '../../pdf/labels';
import { getSettings } from '../settings';
import { verifyUrl } from '../spec-sheets/assemble';

type Db = Knex | Knex.Transaction;

/** Orders whose box can be packed and labelled: ready (every unit passed), or already on its way. */
const PACKABLE: readonly OrderState[] = ['ready', 'shipped', 'delivered'];

async function packableOrder(db: Db, orderId: number) {
  const order = await db('orders').where({ id: orderId }).first();
  if (!order) throw notFound('No such order');
  if (!PACKABLE.includes(order.state)) throw conflict(`Order ${order.number} is not ready to pack yet: every unit must pass its bench test first`);
  return order;
}

/** The units in the order's box, by serial, with what the slip says about each. */
function boxUnits(db: Db, orderId: number) {
  return db('units as u').join('clipping_options as c', 'c.id', 'u.option_id').join('batches as b', 'b.id', 'u.batch_id')
    .join('model_revisions as r', 'r.id', 'b.revision_id').join('models as m', 'm.id', 'r.model_id')
    .where('u.order_id', orderId).whereIn('u.state', ['passed', 'shipped'])
    .select('u.serial', 'm.name as model_name', 'c.name as option_name', 'r.supply_v').orderBy('u.serial');
}

const latestShipment = (db: Db, orderId: number) => db('shipments').where({ order_id: orderId }).orderBy('id', 'desc').first();

/**
 * The packing slip of an order: printed fresh while it is ready (no carrier yet), the slip stored
 * at shipping once it has shipped. 409 before the order is ready.
 */
export async function orderPackingSlip(db: Db, orderId: number): Promise<{ filename: string; data: Buffer }> {
  const order = await packableOrder(db, orderId);
  const shipment = await latestShipment(db, orderId);
  if (shipment?.packing_slip_file_id) {
    const file = await db('files').where({ id: shipment.packing_slip_file_id }).first('filename', 'data');
    if (file) return file;
  }
  const settings = await getSettings(db);
  const data = await compute.packingSlipPdf({ settings, order, shipment: shipment ?? null, units: await boxUnits(db, orderId) });
  return { filename: `packing-slip-${order.number}.pdf`, data };
}

/** The parcel's address label (4 × 6 in or A6) with the order number as a Code 128 barcode. 409 before the order is ready. */
export async function addressLabel(db: Db, orderId: number, size: AddressLabelSize): Promise<{ filename: string; data: Buffer }> {
  const order = await packableOrder(db, orderId);
  const [settings, shipment, units] = await Promise.all([getSettings(db), latestShipment(db, orderId), boxUnits(db, orderId)]);
  const data = await compute.addressLabelPdf({
    size, shop: { name: settings.shop_name, address: settings.shop_address },
    order: {
      number: order.number, ship_name: order.ship_name, ship_line1: order.ship_line1, ship_line2: order.ship_line2 ?? '',
      ship_city: order.ship_city, ship_postcode: order.ship_postcode, ship_country: order.ship_country, ship_phone: order.ship_phone ?? '',
    },
    units: units.length,
    shipment: shipment ? { carrier: shipment.carrier, tracking_number: shipment.tracking_number } : null,
  });
  return { filename: `address-label-${order.number}-${size}.pdf`, data };
}

/**
 * A sheet of serial labels for a batch's units (cancelled ones left out), in sequence order, each
 * with the QR code of the unit's /verify link — the same link its spec sheet prints. Sheet layout
 * follows the shop's paper size. 409 while the batch has no units yet.
 */
export async function serialLabels(db: Db, batchId: number, publicUrl: string): Promise<{ filename: string; data: Buffer }> {
  const batch = await db('batches as b').join('model_revisions as r', 'r.id', 'b.revision_id').join('models as m', 'm.id', 'r.model_id')
    .where('b.id', batchId).first('b.id', 'b.number', 'm.name as model_name');
  if (!batch) throw notFound('No such batch');
  const units = await db('units as u').join('clipping_options as c', 'c.id', 'u.option_id')
    .where('u.batch_id', batchId).whereNot('u.state', 'cancelled').orderBy('u.sequence').select('u.serial', 'u.verify_code', 'c.name as option_name');
  if (units.length === 0) throw conflict(`Batch ${batch.number} has no units yet: release it first`);
  const settings = await getSettings(db);
  const data = await compute.serialLabelsPdf({
    paper: settings.paper_size === 'Letter' ? 'Letter' : 'A4',
    shopName: settings.shop_name,
    units: units.map((u) => ({ serial: u.serial, model: batch.model_name, option: u.option_name, verifyUrl: verifyUrl(publicUrl, u.serial, u.verify_code) })),
  });
  return { filename: `serial-labels-batch-${batch.number}.pdf`, data };
}
