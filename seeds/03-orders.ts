import type { Knex } from 'knex';
import { priceCart } from '../server/services/orders/pricing';
import { orderNumber } from '../server/services/orders/orders';
import { PAYMENT_FAILURE_SENTENCES } from '../server/services/payments/shopper-messages';

// A few demo orders of the invented customers, in several states, so the order desk, "My orders"
// and batch planning have something to show. Idempotent: it adds nothing once demo orders exist,
// and nothing at all while there is no published catalog yet.

type Step = { to: string; daysAgo: number; message: string };

const DEMO_ORDERS: { email: string; pick: [modelIndex: number, optionIndex: number, quantity: number][]; daysAgo: number; steps: Step[]; error?: string }[] = [
  { email: 'customer@shop.example', pick: [[0, 2, 1]], daysAgo: 3, steps: [{ to: 'paid', daysAgo: 3, message: 'Payment received' }] },
  { email: 'sam@mail.example', pick: [[0, 0, 1], [1, 1, 1]], daysAgo: 2, steps: [{ to: 'paid', daysAgo: 2, message: 'Payment received' }] },
  { email: 'sam@mail.example', pick: [[1, 0, 2]], daysAgo: 1, steps: [], error: PAYMENT_FAILURE_SENTENCES.card_declined },
  {
    email: 'customer@shop.example', pick: [[1, 1, 1]], daysAgo: 30,
    steps: [
      { to: 'paid', daysAgo: 30, message: 'Payment received' }, { to: 'scheduled', daysAgo: 28, message: 'Scheduled into a batch' },
      { to: 'in_production', daysAgo: 25, message: 'Build started' }, { to: 'ready', daysAgo: 20, message: 'Built and passed its bench test' },
      { to: 'shipped', daysAgo: 19, message: 'Shipped with Parcelwing, tracking PW 4471 0093 22' }, { to: 'delivered', daysAgo: 16, message: 'Delivered' },
    ],
  },
  { email: 'sam@mail.example', pick: [[0, 1, 1]], daysAgo: 12, steps: [{ to: 'cancelled', daysAgo: 11, message: 'Cancelled before payment' }] },
];

const ADDRESSES: Record<string, { name: string; line1: string; city: string; postcode: string; country: string }> = {
  'customer@shop.example': { name: 'Dee Castellano', line1: 'Rauchgasse 12', city: 'Leipzig', postcode: '04109', country: 'DE' },
  'sam@mail.example': { name: 'Sam Whitlow', line1: 'Verlaine Straat 88', city: 'Utrecht', postcode: '3512 AB', country: 'NL' },
};

const daysAgo = (n: number) => new Date(Date.now() - n * 86_400_000);

export async function seed(knex: Knex): Promise<void> {
  const customers = await knex('users').whereIn('email', Object.keys(ADDRESSES)).select('id', 'email');
  if (customers.length === 0) return;
  const existing = await knex('orders').whereIn('customer_id', customers.map((c) => c.id)).first('id');
  if (existing) return;
  const models = await knex('models').where({ published: true }).orderBy('name').select('id');
  const options = await knex('clipping_options').where({ published: true }).orderBy(['model_id', 'position', 'id']).select('id', 'model_id');
  const catalog = models.map((m) => options.filter((o) => o.model_id === m.id)).filter((list) => list.length > 0);
  if (catalog.length === 0) return;

  await knex.transaction(async (trx) => {
    const settings = await trx('settings').where({ id: 1 }).first('order_number_prefix');
    for (const demo of DEMO_ORDERS) {
      const customer = customers.find((c) => c.email === demo.email);
      if (!customer) continue;
      const lines = demo.pick.map(([mi, oi, quantity]) => {
        const list = catalog[mi % catalog.length];
        const option = list[oi % list.length];
        return { modelId: option.model_id, optionId: option.id, quantity };
      });
      const quote = await priceCart(trx, { lines, country: ADDRESSES[demo.email].country });
      const { rows } = await trx.raw("SELECT nextval('order_number_seq')::int AS n");
      const last = demo.steps.at(-1);
      const paidStep = demo.steps.find((s) => s.to === 'paid');
      const address = ADDRESSES[demo.email];
      const [order] = await trx('orders').insert({
        number: orderNumber(settings.order_number_prefix, rows[0].n), customer_id: customer.id, state: last?.to ?? 'awaiting_payment',
        currency: quote.currency, subtotal_cents: quote.subtotalCents, shipping_cents: quote.shippingCents, tax_cents: quote.taxCents, total_cents: quote.totalCents,
        shipping_tax_cents: quote.shippingTaxCents, tax_rate_basis_points: quote.taxRateBasisPoints, tax_regime: quote.taxRegime, tax_note: quote.taxNote,
        ship_name: address.name, ship_line1: address.line1, ship_city: address.city, ship_postcode: address.postcode, ship_country: address.country,
        paid_at: paidStep ? daysAgo(paidStep.daysAgo) : null, last_payment_error: demo.error ?? null,
        due_at: paidStep ? daysAgo(paidStep.daysAgo - 21) : null,
        created_at: daysAgo(demo.daysAgo), updated_at: daysAgo(last?.daysAgo ?? demo.daysAgo),
      }).returning('id');
      await trx('order_lines').insert(quote.lines.map((l) => ({
        order_id: order.id, model_id: l.modelId, option_id: l.optionId, quantity: l.quantity,
        unit_price_cents: l.unitPriceCents, line_total_cents: l.lineTotalCents, description: l.description,
        net_cents: l.netCents, tax_cents: l.taxCents, tax_rate_basis_points: l.taxRateBasisPoints,
      })));
      const events = [{ order_id: order.id, kind: 'placed', from_state: null as string | null, to_state: 'awaiting_payment', message: 'Order placed', created_at: daysAgo(demo.daysAgo) }];
      let from = 'awaiting_payment';
      for (const step of demo.steps) {
        events.push({ order_id: order.id, kind: 'state-change', from_state: from, to_state: step.to, message: step.message, created_at: daysAgo(step.daysAgo) });
        from = step.to;
      }
      if (demo.error) events.push({ order_id: order.id, kind: 'payment-failed', from_state: null, to_state: null as unknown as string, message: `Payment did not go through: ${demo.error}`, created_at: daysAgo(demo.daysAgo) });
      await trx('order_events').insert(events);
    }
  });
}
