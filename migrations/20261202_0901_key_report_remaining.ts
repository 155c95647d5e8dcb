import type { Knex } from 'knex';

/**
 * Restoring control is checked through the engine, not assumed from the work order: when a report's
 * rekey work order is all installed, the old keys are retired and their holders get re-issue tasks
 * (`rebuilt_at`), and the report closes only when the old keys turn no installed core of the system.
 * Until then `remaining` holds the cores they still turn ([{ coreId, tag, doorId, doorLabel,
 * keySymbol, how }], no bitting), and a supervisor may close the report accepting them, with a note
 * (`close_note`, `closed_by`).
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('key_reports', (t) => {
    t.timestamp('rebuilt_at', { useTz: true });
    t.jsonb('remaining');
    t.text('close_note');
    t.uuid('closed_by').references('users.id').onDelete('SET NULL');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('key_reports', (t) => {
    t.dropColumn('closed_by');
    t.dropColumn('close_note');
    t.dropColumn('remaining');
    t.dropColumn('rebuilt_at');
  });
}
