import type { Knex } from 'knex';

/**
 * Key control, restoring control: which rekey a report's work order made (the option and each
 * old key's new key), the re-issue tasks its close-out leaves for the office, and key audit
 * campaigns (holders confirm by a mailed single-use, expiring link which copies they still
 * hold; only the token's SHA-256 is stored). No table here holds a bitting.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('key_reports', (t) => {
    t.string('rekey_option', 24);
    // [{ oldKeyId, newKeyId }]: every key the work order replaces, retired when its cores are installed.
    t.jsonb('new_keys');
  });
  await knex.schema.createTable('key_reissue_tasks', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('report_id').notNullable().references('key_reports.id').onDelete('CASCADE');
    t.uuid('holder_id').notNullable().references('key_holders.id').onDelete('RESTRICT');
    t.uuid('old_issue_id').notNullable().references('key_issues.id').onDelete('RESTRICT');
    t.uuid('new_key_id').notNullable().references('keys.id').onDelete('RESTRICT');
    t.string('status', 10).notNullable().defaultTo('open').checkIn(['open', 'done'], 'key_reissue_tasks_status_check');
    t.uuid('new_issue_id').references('key_issues.id').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('done_at', { useTz: true });
    // A replayed install or a second close-out adds no second task for the same copy.
    t.unique(['report_id', 'old_issue_id']);
  });
  await knex.schema.createTable('key_campaigns', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.integer('number').notNullable().unique();
    t.string('title', 120).notNullable();
    t.uuid('key_system_id').references('key_systems.id').onDelete('RESTRICT');
    t.uuid('department_id').references('departments.id').onDelete('RESTRICT');
    t.timestamp('expires_at', { useTz: true }).notNullable();
    t.uuid('created_by').references('users.id').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw('CREATE SEQUENCE key_campaign_number_seq START 1');
  await knex.schema.createTable('key_campaign_holders', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('campaign_id').notNullable().references('key_campaigns.id').onDelete('CASCADE');
    t.uuid('holder_id').notNullable().references('key_holders.id').onDelete('RESTRICT');
    t.string('token_hash', 64).notNullable().unique();
    t.timestamp('answered_at', { useTz: true });
    t.unique(['campaign_id', 'holder_id']);
  });
  await knex.schema.createTable('key_campaign_copies', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('campaign_holder_id').notNullable().references('key_campaign_holders.id').onDelete('CASCADE');
    t.uuid('issue_id').notNullable().references('key_issues.id').onDelete('RESTRICT');
    t.string('answer', 10).checkIn(['held', 'missing'], 'key_campaign_copies_answer_check');
    t.uuid('report_id').references('key_reports.id').onDelete('SET NULL');
    t.unique(['campaign_holder_id', 'issue_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('key_campaign_copies');
  await knex.schema.dropTable('key_campaign_holders');
  await knex.raw('DROP SEQUENCE IF EXISTS key_campaign_number_seq');
  await knex.schema.dropTable('key_campaigns');
  await knex.schema.dropTable('key_reissue_tasks');
  await knex.schema.alterTable('key_reports', (t) => {
    t.dropColumn('new_keys');
    t.dropColumn('rekey_option');
  });
}
