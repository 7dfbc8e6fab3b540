import type { Knex } from 'knex';

// Customer orders, their lines (model + clipping option), the event history, provider
// webhook events (for idempotency) and the transactional mail outbox.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('orders', (t) => {
    t.increments('id').primary();
    t.string('number', 20).notNullable().unique(); // shown to customers, e.g. "HM-10042"
    t.integer('customer_id').notNullable().references('users.id');
    t.string('state', 20).notNullable().defaultTo('awaiting_payment');
    t.string('currency', 3).notNullable();
    t.integer('subtotal_cents').notNullable();
    t.integer('shipping_cents').notNullable();
    t.integer('tax_cents').notNullable();
    t.integer('total_cents').notNullable();
    t.string('ship_name', 120).notNullable();
    t.string('ship_line1', 160).notNullable();
    t.string('ship_line2', 160).notNullable().defaultTo('');
    t.string('ship_city', 80).notNullable();
    t.string('ship_postcode', 20).notNullable();
    t.string('ship_country', 2).notNullable(); // ISO 3166-1 alpha-2
    t.string('ship_phone', 40).notNullable().defaultTo('');
    t.string('checkout_session_id', 120).unique();
    t.string('payment_intent_id', 120);
    t.string('last_payment_error', 300);
    t.timestamp('paid_at', { useTz: true });
    t.timestamp('due_at', { useTz: true }); // promised ship date, for planning
    t.text('staff_notes').notNullable().defaultTo('');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['customer_id', 'created_at']);
    t.index(['state']);
  });
  await knex.raw(`ALTER TABLE orders ADD CONSTRAINT orders_state_check CHECK (state IN
    ('awaiting_payment','paid','scheduled','in_production','ready','shipped','delivered','cancelled','refunded'))`);
  await knex.raw('ALTER TABLE orders ADD CONSTRAINT orders_money_check CHECK (subtotal_cents >= 0 AND shipping_cents >= 0 AND tax_cents >= 0 AND total_cents >= 0)');

  await knex.schema.createTable('order_lines', (t) => {
    t.increments('id').primary();
    t.integer('order_id').notNullable().references('orders.id').onDelete('CASCADE');
    t.integer('model_id').notNullable().references('models.id');
    t.integer('option_id').notNullable().references('clipping_options.id');
    t.integer('quantity').notNullable();
    t.integer('unit_price_cents').notNullable(); // base price + surcharge, fixed at ordering
    t.integer('line_total_cents').notNullable();
    t.string('description', 200).notNullable(); // "Model — Option", fixed at ordering
    t.integer('batch_id'); // set when scheduled into a batch (FK added with batches)
  });
  await knex.raw('ALTER TABLE order_lines ADD CONSTRAINT order_lines_quantity_check CHECK (quantity > 0 AND quantity <= 20)');

  await knex.schema.createTable('order_events', (t) => {
    t.bigIncrements('id').primary();
    t.integer('order_id').notNullable().references('orders.id').onDelete('CASCADE');
    t.string('kind', 40).notNullable(); // state-change, note, payment-failed, mail, …
    t.string('from_state', 20);
    t.string('to_state', 20);
    t.text('message').notNullable().defaultTo('');
    t.integer('user_id').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['order_id', 'created_at']);
  });

  // Each provider event is processed once: its id is the primary key.
  await knex.schema.createTable('payment_events', (t) => {
    t.string('id', 120).primary();
    t.string('type', 80).notNullable();
    t.jsonb('payload').notNullable();
    t.timestamp('received_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  // Mail is written here in the same transaction as the change that causes it, then sent by a worker.
  await knex.schema.createTable('outbox', (t) => {
    t.bigIncrements('id').primary();
    t.string('dedupe_key', 200).notNullable().unique(); // one mail per event, e.g. "order-received:42"
    t.string('template', 60).notNullable();
    t.string('to_address', 200).notNullable();
    t.jsonb('data').notNullable(); // what the template needs
    t.jsonb('attachments').notNullable().defaultTo('[]'); // [{filename, fileId}] or generated on send
    t.string('status', 10).notNullable().defaultTo('pending'); // pending | sent | failed
    t.integer('attempts').notNullable().defaultTo(0);
    t.timestamp('next_attempt_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text('last_error');
    t.timestamp('sent_at', { useTz: true });
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['status', 'next_attempt_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('outbox');
  await knex.schema.dropTable('payment_events');
  await knex.schema.dropTable('order_events');
  await knex.schema.dropTable('order_lines');
  await knex.schema.dropTable('orders');
}
