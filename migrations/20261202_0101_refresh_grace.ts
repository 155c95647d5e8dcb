import type { Knex } from 'knex';

/**
 * Refresh rotation with a grace window (RFC 9700 4.14): the secret just rotated out may be
 * presented again for a short while (parallel tabs, a retried request) and gets the same new
 * pair, kept sealed under a key derived from that old secret. Every rotated-out secret is
 * remembered by hash, so only a truly reused secret ends a session, not any wrong guess.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('sessions', (t) => {
    t.string('previous_hash', 64);
    t.timestamp('previous_until', { useTz: true });
    t.text('grace_enc');
  });
  await knex.schema.createTable('session_rotated_secrets', (t) => {
    t.string('hash', 64).primary();
    t.uuid('session_id').notNullable().references('sessions.id').onDelete('CASCADE');
    t.timestamp('rotated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['session_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('session_rotated_secrets');
  await knex.schema.alterTable('sessions', (t) => {
    t.dropColumn('grace_enc');
    t.dropColumn('previous_until');
    t.dropColumn('previous_hash');
  });
}
