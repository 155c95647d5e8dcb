import type { Knex } from 'knex';

/**
 * An administrator's acknowledgement of one audit finding, with a note. The fingerprint
 * (server/services/auditAcknowledgements.ts) covers the finding's code and message and the
 * bittings of the keys it involves, so a change to those keys makes the finding new again.
 * Rows are never deleted by the app: they are part of the key system's audit trail.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('audit_acknowledgements', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('key_system_id').notNullable().references('key_systems.id').onDelete('CASCADE');
    t.string('code', 40).notNullable();
    t.string('fingerprint', 64).notNullable();
    t.text('note').notNullable();
    t.uuid('acknowledged_by').references('users.id').onDelete('SET NULL');
    t.string('acknowledged_by_name', 120).notNullable();
    t.timestamp('acknowledged_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['key_system_id', 'fingerprint']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('audit_acknowledgements');
}
