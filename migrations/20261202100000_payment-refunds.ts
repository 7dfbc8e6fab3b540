import type { Knex } from 'knex';

// Refunds as the provider reports them (kept even before their payment is known, so a refund that
// arrives first is applied when the payment lands), and refunds Kneepoint asks for (written before
// the provider is called, with the idempotency key the call uses, so a retry can never refund twice).
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('payment_refunds', (t) => {
    // The provider's refund id (re_…), or a charge id (ch_…) carrying the charge's cumulative refunded amount.
    t.string('id', 120).primary();
    t.string('kind', 10).notNullable(); // refund | charge
    t.string('payment_intent_id', 120).notNullable().index();
    t.integer('amount_cents').notNullable();
    t.timestamp('received_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`ALTER TABLE payment_refunds ADD CONSTRAINT payment_refunds_kind_check CHECK (kind IN ('refund','charge'))`);

  await knex.schema.createTable('refund_requests', (t) => {
    t.increments('id').primary();
    t.integer('order_id').notNullable().references('orders.id').onDelete('CASCADE');
    t.string('payment_intent_id', 120).notNullable();
    t.string('idempotency_key', 200).notNullable().unique();
    t.string('reason', 20).notNullable(); // cancelled | late-payment
    t.text('message').notNullable().defaultTo('');
    t.integer('user_id').references('users.id');
    t.string('status', 10).notNullable().defaultTo('pending'); // pending | done | failed
    t.integer('attempts').notNullable().defaultTo(0); // each provider attempt has its own idempotency key
    t.string('refund_id', 120).unique();
    t.text('last_error');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['order_id', 'status']);
  });
  await knex.raw(`ALTER TABLE refund_requests ADD CONSTRAINT refund_requests_status_check CHECK (status IN ('pending','done','failed'))`);

  // One payment intent belongs to one order.
  await knex.schema.alterTable('orders', (t) => t.unique(['payment_intent_id']));
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('orders', (t) => t.dropUnique(['payment_intent_id']));
  await knex.schema.dropTable('refund_requests');
  await knex.schema.dropTable('payment_refunds');
}
