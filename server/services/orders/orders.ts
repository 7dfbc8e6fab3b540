import { PLANNING } from '../../../shared/roles';
import type { Knex } from 'knex';
import type { SessionUser } from '../../../shared/roles';
import type { MyOrdersQuery, OrderFilter, PlaceOrderInput } from '../../../shared/schemas/orders';
import { ORDER_STATE_LABELS, type OrderState } from '../../../shared/order-states';
import { stringify } from 'csv-stringify/sync';
import { invalid, notFound } from '../../errors';
import { containsPattern, paged } from '../../http/paged';
import { getSettings } from '../settings';
import { documentsOf } from './invoices';
import { priceCart } from './pricing';
import { transitionOrder } from './transitions';

/** Staff who may see and annotate every order. */
export const ORDER_STAFF = PLANNING;

/** History rows only staff see: their notes, and the payments provider's ids and codes. */
export const STAFF_ONLY_EVENT_KINDS = ['note', 'payment-detail'];

export interface OrderRow {
  id: number;
  number: string;
  customer_id: number;
  state: OrderState;
  currency: string;
  subtotal_cents: number;
  shipping_cents: number;
  shipping_tax_cents: number;
  tax_cents: number;
  total_cents: number;
  tax_rate_basis_points: number | null;
  tax_regime: 'domestic' | 'eu-destination' | 'eu-home-rate' | 'export' | null;
  tax_note: string;
  ship_name: string;
  ship_line1: string;
  ship_line2: string;
  ship_city: string;
  ship_postcode: string;
  ship_country: string;
  ship_phone: string;
  checkout_session_id: string | null;
  payment_intent_id: string | null;
  last_payment_error: string | null;
  paid_at: Date | null;
  due_at: Date | null;
  staff_notes: string;
  created_at: Date;
  updated_at: Date;
}

/** An order's number as customers see it: the shop's order-number prefix and the next value of order_number_seq. */
export const orderNumber = (prefix: string, n: number) => `${prefix}-${n}`;

/** Creates an order awaiting payment, priced on the server (tax by its destination), in one transaction. */
export async function placeOrder(knex: Knex, customer: SessionUser, input: PlaceOrderInput) {
  return knex.transaction(async (trx) => {
    const quote = await priceCart(trx, input);
    const settings = await getSettings(trx);
    const { rows } = await trx.raw<{ rows: { n: number }[] }>("SELECT nextval('order_number_seq')::int AS n");
    const s = input.shipping;
    const [order] = await trx('orders')
      .insert({
        number: orderNumber(settings.order_number_prefix, rows[0].n),
        customer_id: customer.id,
        currency: quote.currency,
        subtotal_cents: quote.subtotalCents,
        shipping_cents: quote.shippingCents,
        shipping_tax_cents: quote.shippingTaxCents,
        tax_cents: quote.taxCents,
        total_cents: quote.totalCents,
        tax_rate_basis_points: quote.taxRateBasisPoints,
        tax_regime: quote.taxRegime,
        tax_note: quote.taxNote,
        ship_name: s.name, ship_line1: s.line1, ship_line2: s.line2, ship_city: s.city,
        ship_postcode: s.postcode, ship_country: s.country, ship_phone: s.phone,
      })
      .returning('*');
    await trx('order_lines').insert(
      quote.lines.map((l) => ({
        order_id: order.id, model_id: l.modelId, option_id: l.optionId, quantity: l.quantity,
        unit_price_cents: l.unitPriceCents, line_total_cents: l.lineTotalCents, description: l.description,
        net_cents: l.netCents, tax_cents: l.taxCents, tax_rate_basis_points: l.taxRateBasisPoints,
      })),
    );
    await trx('order_events').insert({ order_id: order.id, kind: 'placed', to_state: 'awaiting_payment', message: 'Order placed', user_id: customer.id });
    return order as OrderRow;
  });
}

const isStaff = (user: SessionUser) => (ORDER_STAFF as readonly string[]).includes(user.role);

/**
 * An order the user may see: their own, or any for order staff. Someone else's order answers
 * 404, not 403, so order ids cannot be probed.
 */
export async function findVisibleOrder(knex: Knex | Knex.Transaction, user: SessionUser, id: number): Promise<OrderRow> {
  const query = knex('orders').where({ id });
  if (!isStaff(user)) query.andWhere({ customer_id: user.id });
  const order = await query.first();
  if (!order) throw notFound('No such order');
  return order as OrderRow;
}

async function linesOf(knex: Knex, orderIds: number[]) {
  if (orderIds.length === 0) return [];
  return knex('order_lines as l')
    .join('clipping_options as o', 'o.id', 'l.option_id')
    .whereIn('l.order_id', orderIds)
    .orderBy('l.id')
    .select('l.id', 'l.order_id', 'l.model_id', 'l.option_id', 'l.quantity', 'l.unit_price_cents', 'l.line_total_cents', 'l.net_cents', 'l.tax_cents', 'l.tax_rate_basis_points', 'l.description', 'l.batch_id', 'o.code as option_code');
}

/** The order with its lines, events and (for staff) the customer and notes. */
export async function orderDetail(knex: Knex, user: SessionUser, id: number) {
  const order = await findVisibleOrder(knex, user, id);
  const [lines, events, customer, documents, shipments] = await Promise.all([
    linesOf(knex, [order.id]),
    knex('order_events as e').leftJoin('users as u', 'u.id', 'e.user_id').where('e.order_id', order.id)
      .orderBy('e.id').select('e.id', 'e.kind', 'e.from_state', 'e.to_state', 'e.message', 'e.created_at', 'u.name as user_name'),
    knex('users').where({ id: order.customer_id }).first('id', 'name', 'email'),
    documentsOf(knex, order.id),
    knex('shipments').where({ order_id: order.id }).orderBy('id')
      .select('id', 'carrier', 'tracking_number as trackingNumber', 'tracking_url as trackingUrl', 'shipped_at as shippedAt', 'delivered_at as deliveredAt'),
  ]);
  const staff = isStaff(user);
  return {
    order: { ...publicOrder(order), staffNotes: staff ? order.staff_notes : undefined, customer: staff ? customer : undefined },
    lines,
    documents,
    // The parcel(s): carrier, tracking number and the carrier's tracking link ('' for shipments made before carriers had templates).
    shipments,
    // Customers see their order's story without staff-only notes and provider details.
    events: staff ? events : events.filter((e) => !STAFF_ONLY_EVENT_KINDS.includes(e.kind)),
  };
}

/** The order fields a client sees; provider ids stay on the server. */
export function publicOrder(o: OrderRow) {
  return {
    id: o.id, number: o.number, state: o.state, currency: o.currency,
    subtotalCents: o.subtotal_cents, shippingCents: o.shipping_cents, taxCents: o.tax_cents, totalCents: o.total_cents,
    taxRateBasisPoints: o.tax_rate_basis_points, taxRegime: o.tax_regime, taxNote: o.tax_note,
    shipping: { name: o.ship_name, line1: o.ship_line1, line2: o.ship_line2, city: o.ship_city, postcode: o.ship_postcode, country: o.ship_country, phone: o.ship_phone },
    lastPaymentError: o.last_payment_error, paidAt: o.paid_at, dueAt: o.due_at, createdAt: o.created_at, updatedAt: o.updated_at,
  };
}

const MY_ORDER_SORT: Record<MyOrdersQuery['sort'], string> = { createdAt: 'created_at', number: 'id', totalCents: 'total_cents' };

/** The customer's own orders, one page at a time (newest first unless asked), each with its lines; `q` finds an order number. */
export async function myOrders(knex: Knex, user: SessionUser, params: MyOrdersQuery) {
  const base = () => {
    const q = knex('orders').where({ customer_id: user.id });
    if (params.state) q.where({ state: params.state });
    if (params.q) q.whereILike('number', containsPattern(params.q));
    return q;
  };
  const page = await paged(params, { count: base(), rows: base().select('*'), sortColumns: MY_ORDER_SORT, tieBreak: 'id', map: (o: OrderRow) => o });
  const lines = await linesOf(knex, page.items.map((o) => o.id));
  return { ...page, items: page.items.map((o) => ({ ...publicOrder(o), lines: lines.filter((l) => l.order_id === o.id) })) };
}

const ORDER_SORT: Record<OrderFilter['sort'], string> = {
  createdAt: 'o.created_at', number: 'o.id', state: 'o.state', totalCents: 'o.total_cents', customerName: 'u.name',
};

/**
 * The order desk's filters as one query on `orders as o` joined to `users as u`: state, option,
 * placed date (the shop's calendar days) and a search `q` that matches the order number, the
 * customer's name or e-mail, the name on the parcel, or a serial of one of the order's units (what a
 * customer reads off the base plate). The page and the CSV export both start from it.
 */
function filteredOrders(knex: Knex, filter: Omit<OrderFilter, 'page' | 'pageSize' | 'sort' | 'dir'>, timeZone: string, withCustomer = true) {
  const query = knex('orders as o');
  // Every order has its customer (a foreign key), so a count needs the customer only to search names.
  if (withCustomer) query.join('users as u', 'u.id', 'o.customer_id');
  if (filter.state) query.where('o.state', filter.state);
  if (filter.optionId) query.whereExists(knex('order_lines as l').whereRaw('l.order_id = o.id').andWhere('l.option_id', filter.optionId));
  // Dates are the shop's calendar days, so "from 1 Dec" means midnight in the shop's zone.
  if (filter.from) query.whereRaw('o.created_at >= (?::date)::timestamp AT TIME ZONE ?', [filter.from, timeZone]);
  if (filter.to) query.whereRaw("o.created_at < ((?::date + 1)::timestamp AT TIME ZONE ?)", [filter.to, timeZone]);
  if (filter.q && withCustomer) {
    const like = containsPattern(filter.q.trim());
    query.where((w) => w.whereILike('o.number', like).orWhereILike('u.name', like).orWhereILike('u.email', like).orWhereILike('o.ship_name', like)
      .orWhereExists(knex('units as s').whereRaw('s.order_id = o.id').andWhereILike('s.serial', like)));
  }
  return query;
}

/** The shop's time zone matters only for the date filters, so only they read the settings. */
const filterTimeZone = async (knex: Knex, filter: Pick<OrderFilter, 'from' | 'to'>) => (filter.from || filter.to ? (await getSettings(knex)).time_zone : 'UTC');

/** Orders for staff, one page at a time: filtered by state, option, placed date (shop time zone) and a search. */
export async function listOrders(knex: Knex, filter: OrderFilter) {
  const timeZone = await filterTimeZone(knex, filter);
  const base = (withCustomer = true) => filteredOrders(knex, filter, timeZone, withCustomer);
  const page = await paged(filter, {
    count: base(Boolean(filter.q)),
    rows: base().select('o.id', 'o.number', 'o.state', 'o.currency', 'o.total_cents', 'o.created_at', 'o.paid_at', 'u.name as customer_name', 'u.email as customer_email'),
    sortColumns: ORDER_SORT, tieBreak: 'o.id', map: (row: Omit<OrderListRow, 'units' | 'summary'>) => row,
  });
  // The lines of this page's orders in one grouped query, not two subqueries per row.
  const sums = page.items.length
    ? await knex('order_lines').whereIn('order_id', page.items.map((o) => o.id)).groupBy('order_id')
        .select('order_id', knex.raw('SUM(quantity)::int AS units'), knex.raw("string_agg(description, '; ' ORDER BY id) AS summary"))
    : [];
  const byOrder = new Map(sums.map((r: { order_id: number; units: number; summary: string }) => [r.order_id, r]));
  return { ...page, items: page.items.map((o): OrderListRow => ({ ...o, units: byOrder.get(o.id)?.units ?? 0, summary: byOrder.get(o.id)?.summary ?? '' })) };
}

/** The most rows one CSV export holds; a bigger list is refused with a request to narrow the filters. */
export const ORDER_CSV_MAX_ROWS = 50_000;

/**
 * The order desk's filtered list as CSV, every matching order (no paging) in the list's sort order:
 * one row per order with its customer, status, what was ordered, the unit serials and the money
 * (cents as decimal amounts in the order's currency). Times are UTC ISO 8601.
 */
export async function ordersCsv(knex: Knex, filter: OrderFilter): Promise<string> {
  const timeZone = await filterTimeZone(knex, filter);
  const [{ n }] = await filteredOrders(knex, filter, timeZone, Boolean(filter.q)).count<{ n: number }[]>('* as n');
  if (Number(n) > ORDER_CSV_MAX_ROWS) throw invalid(`That is ${n} orders; one export holds at most ${ORDER_CSV_MAX_ROWS}: narrow the filters (dates or status)`);
  const rows = await filteredOrders(knex, filter, timeZone)
    .select('o.number', 'o.created_at', 'o.paid_at', 'o.state', 'o.currency', 'o.subtotal_cents', 'o.shipping_cents', 'o.tax_cents', 'o.total_cents',
      'u.name as customer_name', 'u.email as customer_email', 'o.ship_country',
      knex.raw("(SELECT COALESCE(SUM(l.quantity), 0)::int FROM order_lines l WHERE l.order_id = o.id) AS units"),
      knex.raw("(SELECT string_agg(l.quantity || ' × ' || l.description, '; ' ORDER BY l.id) FROM order_lines l WHERE l.order_id = o.id) AS summary"),
      knex.raw("(SELECT string_agg(s.serial, ' ' ORDER BY s.serial) FROM units s WHERE s.order_id = o.id AND s.state <> 'cancelled') AS serials"))
    .orderBy([{ column: ORDER_SORT[filter.sort], order: filter.dir, nulls: filter.dir === 'asc' ? 'last' : 'first' }, { column: 'o.id', order: filter.dir }]);
  const amount = (cents: number) => (cents / 100).toFixed(2);
  const iso = (d: Date | null) => (d ? new Date(d).toISOString() : '');
  return stringify(rows.map((o) => [o.number, iso(o.created_at), iso(o.paid_at), ORDER_STATE_LABELS[o.state as OrderState], o.customer_name, o.customer_email, o.ship_country,
    o.units, o.summary ?? '', o.serials ?? '', o.currency, amount(o.subtotal_cents), amount(o.shipping_cents), amount(o.tax_cents), amount(o.total_cents)]), {
    header: true,
    // Names and e-mails are typed by customers: a cell starting with = + - @ is prefixed with ' so a
    // spreadsheet shows it as text instead of running it (the package's documented escape_formulas).
    escape_formulas: true,
    columns: ['order number', 'placed (UTC)', 'paid (UTC)', 'status', 'customer', 'e-mail', 'ship to country', 'units', 'what', 'serials', 'currency', 'subtotal', 'shipping', 'tax', 'total'],
  });
}

/** A row of the order desk's list. */
export interface OrderListRow {
  id: number; number: string; state: OrderState; currency: string; total_cents: number; created_at: Date; paid_at: Date | null;
  customer_name: string; customer_email: string; units: number; summary: string;
}

/** A staff note goes into the history (with who wrote it) and onto the order's notes. */
export async function addStaffNote(knex: Knex, user: SessionUser, id: number, note: string) {
  return knex.transaction(async (trx) => {
    const order = await trx('orders').where({ id }).forUpdate().first();
    if (!order) throw notFound('No such order');
    const notes = order.staff_notes ? `${order.staff_notes}\n${note}` : note;
    await trx('orders').where({ id }).update({ staff_notes: notes, updated_at: trx.fn.now() });
    await trx('order_events').insert({ order_id: id, kind: 'note', message: note, user_id: user.id });
  });
}

/** Staff confirm the parcel arrived (shipped → delivered); anything else is a 409 from the state machine. */
export async function markDelivered(knex: Knex, user: SessionUser, id: number, message: string) {
  return knex.transaction(async (trx) => transitionOrder(trx, id, 'delivered', { userId: user.id, message: message || 'Delivered' }));
}
