import type { Knex } from 'knex';

// A bench test keeps what the capture measured harmonic by harmonic, so the unit page and the spec
// sheet can print a "measured" column beside the predicted one. `measured_harmonics` is
// [{order, amplitudeFs, dbc}] for H1…H10 (null when the THD was typed without a capture);
// `measured_thd_r_percent` is THD_R from the same harmonics. The per-harmonic tolerance (dB) is a
// shop setting, copied onto each record like the THD tolerance, so an old verdict can be re-read.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('test_records', (t) => {
    t.jsonb('measured_harmonics');
    t.double('measured_thd_r_percent');
    t.double('harmonic_tolerance_db');
  });
  await knex.schema.alterTable('settings', (t) => {
    t.double('harmonic_tolerance_db').notNullable().defaultTo(3); // measured vs predicted level of each harmonic, ± dB
  });
  await knex.raw('ALTER TABLE settings ADD CONSTRAINT settings_harmonic_tolerance_db_check CHECK (harmonic_tolerance_db > 0)');
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('settings', (t) => t.dropColumn('harmonic_tolerance_db'));
  await knex.schema.alterTable('test_records', (t) => {
    t.dropColumn('measured_harmonics');
    t.dropColumn('measured_thd_r_percent');
    t.dropColumn('harmonic_tolerance_db');
  });
}
