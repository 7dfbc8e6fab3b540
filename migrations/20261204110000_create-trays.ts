import type { Knex } from 'knex';

// Trays: one lot of one clipping device, measured slot by slot at the bench test current. A slot
// taken into a unit by matching keeps the unit and the option device it went into.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('trays', (t) => {
    t.increments('id').primary();
    t.integer('device_id').notNullable().references('devices.id');
    t.string('supplier_lot', 80).notNullable();
    t.date('received_on').notNullable();
    t.double('test_current_ma').notNullable();
    t.text('notes').notNullable().defaultTo('');
    t.integer('created_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['device_id']);
  });
  await knex.schema.createTable('tray_slots', (t) => {
    t.increments('id').primary();
    t.integer('tray_id').notNullable().references('trays.id').onDelete('CASCADE');
    t.integer('slot').notNullable();
    t.double('vf').notNullable();
    t.integer('unit_id').references('units.id');
    t.integer('option_device_id').references('option_devices.id');
    t.integer('user_id').references('users.id');
    t.timestamp('measured_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['tray_id', 'slot']);
    t.unique(['unit_id', 'option_device_id']);
    t.index(['unit_id']);
  });
  await knex.raw('ALTER TABLE tray_slots ADD CONSTRAINT tray_slots_slot_check CHECK (slot BETWEEN 1 AND 500)');
  await knex.raw('ALTER TABLE tray_slots ADD CONSTRAINT tray_slots_vf_check CHECK (vf > 0 AND vf <= 10)');
  await knex.raw('ALTER TABLE tray_slots ADD CONSTRAINT tray_slots_taken_check CHECK ((unit_id IS NULL) = (option_device_id IS NULL))');
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('tray_slots');
  await knex.schema.dropTable('trays');
}
