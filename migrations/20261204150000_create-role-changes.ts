import type { Knex } from 'knex';

// Every change of a person's role, who made it and whether it was undone: the owner can undo a
// change for a minute after making it (server/services/users.ts), and the rows stay as a record.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('role_changes', (t) => {
    t.increments('id').primary();
    t.integer('user_id').notNullable().references('id').inTable('users').onDelete('CASCADE');
    t.string('from_role', 20).notNullable();
    t.string('to_role', 20).notNullable();
    t.integer('changed_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('changed_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('undone_at', { useTz: true });
    t.integer('undone_by').references('id').inTable('users').onDelete('SET NULL');
    t.index(['user_id', 'changed_at']);
    t.index(['changed_by']);
    t.index(['undone_by']);
  });
  await knex.raw(`ALTER TABLE role_changes ADD CONSTRAINT role_changes_roles_check CHECK (
    from_role IN ('owner', 'planner', 'assembler', 'tester', 'customer')
    AND to_role IN ('owner', 'planner', 'assembler', 'tester', 'customer') AND from_role <> to_role)`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('role_changes');
}
