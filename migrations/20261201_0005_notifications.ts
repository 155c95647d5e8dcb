import type { Knex } from 'knex';

/**
 * Mail owed because of synced work (failed key check, work order finished), written in the
 * same transaction as the work itself, so a server killed after the commit still sends it.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('notifications', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.string('kind', 30).notNullable();
    t.uuid('ref_id').notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('sent_at', { useTz: true });
    t.integer('attempts').notNullable().defaultTo(0);
    t.text('last_error');
    t.unique(['kind', 'ref_id']);
  });
  await knex.raw('CREATE INDEX notifications_unsent ON notifications (created_at) WHERE sent_at IS NULL');
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('notifications');
}
