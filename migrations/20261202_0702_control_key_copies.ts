import type { Knex } from 'knex';

/**
 * Key control, control keys as keys: each system's control key gets a record (`control_keys`,
 * symbol `CK` for the one every system has now) so its copies are issued, returned, passed on and
 * reported like any key's (`key_issues.control_key_id` instead of `key_id`, copy numbers unique
 * per control key as per key). A lost control key's rekey puts a new control key in its place: the
 * old one is `replaced` and keeps its own sealed bitting, and each core built for it says so
 * (`cores.control_key_id`; null: the system's control key now), until its cores are rebuilt and it
 * is `retired`. The active control key's bitting stays in `key_systems.control_enc`.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('control_keys', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('key_system_id').notNullable().references('key_systems.id').onDelete('RESTRICT');
    t.string('symbol', 24).notNullable();
    t.string('status', 10).notNullable().defaultTo('active').checkIn(['active', 'replaced', 'retired'], 'control_keys_status_check');
    // Only once replaced: sealed with the control key's own id as additional data.
    t.text('bitting_enc');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('retired_at', { useTz: true });
    t.unique(['key_system_id', 'symbol']);
  });
  await knex.raw(`CREATE UNIQUE INDEX control_keys_one_active ON control_keys (key_system_id) WHERE status = 'active'`);
  await knex.raw(`INSERT INTO control_keys (key_system_id, symbol) SELECT id, 'CK' FROM key_systems`);
  await knex.schema.alterTable('key_issues', (t) => {
    t.setNullable('key_id');
    t.uuid('control_key_id').references('control_keys.id').onDelete('RESTRICT');
    t.index(['control_key_id']);
  });
  await knex.raw('ALTER TABLE key_issues ADD CONSTRAINT key_issues_one_key_check CHECK ((key_id IS NULL) <> (control_key_id IS NULL))');
  await knex.raw(`CREATE UNIQUE INDEX key_issues_control_copy_unique ON key_issues (control_key_id, copy_number) WHERE status <> 'transferred' AND control_key_id IS NOT NULL`);
  await knex.schema.alterTable('cores', (t) => {
    t.uuid('control_key_id').references('control_keys.id').onDelete('RESTRICT');
  });
  await knex.schema.alterTable('key_reports', (t) => {
    // A lost control key's rekey: the control key put in its place (its work order rebuilds every core).
    t.uuid('new_control_key_id').references('control_keys.id').onDelete('RESTRICT');
  });
}

export async function down(knex: Knex): Promise<void> {
  if (await knex('key_issues').whereNotNull('control_key_id').first('id')) throw new Error('Control key copies have been issued: their records cannot be kept without control key records.');
  await knex.schema.alterTable('key_reports', (t) => t.dropColumn('new_control_key_id'));
  await knex.schema.alterTable('cores', (t) => t.dropColumn('control_key_id'));
  await knex.raw('DROP INDEX key_issues_control_copy_unique');
  await knex.raw('ALTER TABLE key_issues DROP CONSTRAINT key_issues_one_key_check');
  await knex.schema.alterTable('key_issues', (t) => {
    t.dropIndex(['control_key_id']);
    t.dropColumn('control_key_id');
    t.dropNullable('key_id');
  });
  await knex.schema.dropTable('control_keys');
}
