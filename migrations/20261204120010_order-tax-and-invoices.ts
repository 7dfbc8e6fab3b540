import type { Knex } from 'knex';

// VAT by destination on each order and line (what was charged, fixed when the order is placed),
// and numbered invoices and credit notes. Numbers come from one counter row per kind, taken under
// its row lock in the transaction that issues the document, so a rollback gives the number back:
// the series has no gaps.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('orders', (t) => {
    t.integer('tax_rate_basis_points'); // the one VAT rate of the order (destination, home or 0 for exports)
    t.string('tax_regime', 20); // domestic | eu-destination | eu-home-rate | export
    t.string('tax_note', 300).notNullable().defaultTo('');
    t.integer('shipping_tax_cents').notNullable().defaultTo(0);
  });
  await knex.raw(`ALTER TABLE orders ADD CONSTRAINT orders_tax_regime_check CHECK (tax_regime IN ('domestic','eu-destination','eu-home-rate','export'))`);
  await knex.schema.alterTable('order_lines', (t) => {
    t.integer('net_cents');
    t.integer('tax_cents');
    t.integer('tax_rate_basis_points');
  });

  await knex.schema.createTable('document_counters', (t) => {
    t.string('kind', 20).primary(); // invoice | credit-note
    t.integer('next_number').notNullable().defaultTo(1);
  });

  await knex.schema.createTable('invoices', (t) => {
    t.increments('id').primary();
    t.string('kind', 20).notNullable(); // invoice | credit-note
    t.integer('sequence').notNullable(); // 1, 2, 3 … per kind, without gaps
    t.string('number', 30).notNullable().unique(); // as printed, e.g. INV-000042
    t.integer('order_id').notNullable().references('orders.id');
    t.integer('refers_to_invoice_id').references('invoices.id'); // a credit note's invoice
    t.string('source_key', 160).notNullable(); // what issued it: the order's payment, a refund id: issued once
    t.timestamp('issued_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.string('currency', 3).notNullable();
    t.integer('net_cents').notNullable();
    t.integer('tax_cents').notNullable();
    t.integer('total_cents').notNullable();
    t.integer('tax_rate_basis_points').notNullable();
    t.string('tax_regime', 20).notNullable();
    t.string('tax_note', 300).notNullable().defaultTo('');
    t.jsonb('seller').notNullable(); // name, address, VAT id, e-mail, public URL at issue time
    t.jsonb('buyer').notNullable(); // name and address
    t.jsonb('lines').notNullable(); // [{description, quantity, unitPriceCents, netCents, taxRateBasisPoints, taxCents, totalCents}]
    t.integer('file_id').references('files.id').onDelete('SET NULL'); // the PDF, once rendered
    t.text('render_error');
    t.unique(['kind', 'sequence']);
    t.unique(['kind', 'source_key']);
    t.index(['order_id']);
  });
  await knex.raw(`ALTER TABLE invoices ADD CONSTRAINT invoices_kind_check CHECK (kind IN ('invoice','credit-note'))`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('invoices');
  await knex.schema.dropTable('document_counters');
  await knex.schema.alterTable('order_lines', (t) => {
    t.dropColumn('net_cents');
    t.dropColumn('tax_cents');
    t.dropColumn('tax_rate_basis_points');
  });
  await knex.raw('ALTER TABLE orders DROP CONSTRAINT orders_tax_regime_check');
  await knex.schema.alterTable('orders', (t) => {
    for (const c of ['tax_rate_basis_points', 'tax_regime', 'tax_note', 'shipping_tax_cents']) t.dropColumn(c);
  });
}
