import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.raw('CREATE EXTENSION IF NOT EXISTS citext');
  await knex.schema.createTable('users', (t) => {
    t.increments('id').primary();
    t.specificType('email', 'citext').notNullable().unique();
    t.string('name', 120).notNullable();
    t.string('role', 20).notNullable();
    t.string('password_hash', 100).notNullable();
    t.boolean('active').notNullable().defaultTo(true);
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`ALTER TABLE users ADD CONSTRAINT users_role_check
    CHECK (role IN ('owner', 'planner', 'assembler', 'tester', 'customer'))`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('users');
}
