import type { Knex } from 'knex';

// One row per "forgot password" request: only a sha256 of the mailed token is kept, so a copy of
// the database cannot be used to reset anyone's password. A row is used once (used_at) and is
// worthless after expires_at; housekeeping deletes old rows.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('password_resets', (t) => {
    t.increments('id');
    t.integer('user_id').notNullable().references('users.id').onDelete('CASCADE').index();
    t.specificType('token_hash', 'char(64)').notNullable().unique();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('expires_at', { useTz: true }).notNullable().index();
    t.timestamp('used_at', { useTz: true });
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('password_resets');
}
