import type { Knex } from 'knex';

// A random code per unit, printed with the verification link on its spec sheet (…/verify/SERIAL?c=CODE),
// so the public check cannot be walked serial by serial. Units that exist now keep no code: their
// sheets are printed already and their serial alone stays valid. New units get one from the default
// (gen_random_uuid is built into PostgreSQL 13+; 20 hex digits keep about 74 random bits).
export async function up(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE units ADD COLUMN verify_code varchar(40)');
  await knex.raw(`ALTER TABLE units ALTER COLUMN verify_code SET DEFAULT substr(replace(gen_random_uuid()::text, '-', ''), 1, 20)`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE units DROP COLUMN verify_code');
}
