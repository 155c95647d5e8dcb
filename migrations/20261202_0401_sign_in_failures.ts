import type { Knex } from 'knex';

/**
 * Failed sign-in and set-password attempts, counted in the database so every API process
 * behind a load balancer shares one lockout (OWASP Authentication Cheat Sheet). The key is a
 * SHA-256 of "purpose|address|e-mail": no raw input is ever stored.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('sign_in_failures', (t) => {
    t.string('key_hash', 64).primary();
    t.integer('failures').notNullable();
    t.timestamp('reset_at', { useTz: true }).notNullable();
    t.index(['reset_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('sign_in_failures');
}
