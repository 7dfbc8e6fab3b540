import type { Knex } from 'knex';

// An index for every foreign key the services join or filter on, so lookups by parent stay
// index scans as history grows. Already covered elsewhere (leading column of a unique key or
// index): units.batch_id (batch_id, sequence), stock_movements.part_id (part_id, created_at) and
// .batch_id (batch_id, part_id), unit_events.unit_id, order_events.order_id, sheet_jobs.batch_id,
// shipments.order_id, units.order_id, unit_steps/unit_devices/unit_part_lots.unit_id,
// spec_sheets.unit_id, clipping_options.model_id, model_revisions.model_id, build_steps.revision_id,
// option_devices.option_id. Who-did-it columns pointing at users are never filtered on and stay bare.
const INDEXES: [name: string, table: string, columns: string][] = [
  ['order_lines_order_idx', 'order_lines', 'order_id'],
  ['order_lines_batch_idx', 'order_lines', 'batch_id'],
  ['batch_lines_batch_idx', 'batch_lines', 'batch_id'],
  ['batch_lines_option_idx', 'batch_lines', 'option_id'],
  ['batches_revision_idx', 'batches', 'revision_id'],
  ['batches_state_idx', 'batches', 'state'],
  ['units_batch_line_idx', 'units', 'batch_line_id'],
  ['units_option_state_idx', 'units', 'option_id, state'],
  ['units_state_planned_idx', 'units', 'state, planned_date'],
  ['units_shipment_idx', 'units', 'shipment_id'],
  ['stock_movements_unit_idx', 'stock_movements', 'unit_id'],
  ['test_records_unit_idx', 'test_records', 'unit_id, created_at'],
  ['unit_photos_unit_idx', 'unit_photos', 'unit_id'],
  ['unit_steps_step_idx', 'unit_steps', 'step_id'],
  ['unit_devices_option_device_idx', 'unit_devices', 'option_device_id'],
  ['unit_part_lots_bom_line_idx', 'unit_part_lots', 'bom_line_id'],
  ['bom_lines_revision_idx', 'bom_lines', 'revision_id'],
  ['bom_lines_part_idx', 'bom_lines', 'part_id'],
  ['option_devices_device_idx', 'option_devices', 'device_id'],
  ['devices_part_idx', 'devices', 'part_id'],
  ['parts_supplier_idx', 'parts', 'supplier_id'],
  ['sheet_jobs_state_idx', 'sheet_jobs', 'state'],
];

export async function up(knex: Knex): Promise<void> {
  for (const [name, table, columns] of INDEXES) await knex.raw(`CREATE INDEX IF NOT EXISTS ${name} ON ${table} (${columns})`);
}

export async function down(knex: Knex): Promise<void> {
  for (const [name] of [...INDEXES].reverse()) await knex.raw(`DROP INDEX IF EXISTS ${name}`);
}
