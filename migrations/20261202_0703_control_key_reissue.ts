import type { Knex } from 'knex';

/**
 * Re-issue tasks for a control key's copies: when a lost control key's rekey is installed, every holder
 * of a copy of it gets a task naming the new control key (`new_control_key_id`) instead of a key.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('key_reissue_tasks', (t) => {
    t.setNullable('new_key_id');
    t.uuid('new_control_key_id').references('control_keys.id').onDelete('RESTRICT');
  });
  await knex.raw('ALTER TABLE key_reissue_tasks ADD CONSTRAINT key_reissue_tasks_one_key_check CHECK ((new_key_id IS NULL) <> (new_control_key_id IS NULL))');
}

export async function down(knex: Knex): Promise<void> {
  if (await knex('key_reissue_tasks').whereNotNull('new_control_key_id').first('id')) throw new Error('Re-issue tasks for control keys exist: they cannot be kept without a key to name.');
  await knex.raw('ALTER TABLE key_reissue_tasks DROP CONSTRAINT key_reissue_tasks_one_key_check');
  await knex.schema.alterTable('key_reissue_tasks', (t) => {
    t.dropColumn('new_control_key_id');
    t.dropNullable('new_key_id');
  });
}
