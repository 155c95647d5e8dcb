import type { Knex } from 'knex';

/**
 * Key audit reminders and links sent again. A key audit (stored as `key_campaigns`) can be closed; each holder asked
 * keeps when they were last mailed a link and how many reminders went. A reminder is one row per holder and day
 * (unique, so two server processes queue it once) and goes out as a `key-audit-reminder` notification. Every mail
 * carries a new single-use link that replaces the one before: the old token's hash is kept in
 * `key_audit_replaced_links` so it can answer "use the newest e-mail" instead of "not valid". An authoriser's link
 * for a key request can be sent again the same way (`key_request_links.replaced_at`, `sent_at`).
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('key_campaigns', (t) => {
    t.timestamp('closed_at', { useTz: true });
    t.uuid('closed_by').references('users.id').onDelete('SET NULL');
  });
  await knex.schema.alterTable('key_campaign_holders', (t) => {
    t.timestamp('mailed_at', { useTz: true });
    t.integer('reminders').notNullable().defaultTo(0);
  });
  await knex.raw('UPDATE key_campaign_holders ch SET mailed_at = c.created_at FROM key_campaigns c WHERE c.id = ch.campaign_id');
  await knex.schema.createTable('key_audit_reminders', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('campaign_holder_id').notNullable().references('key_campaign_holders.id').onDelete('CASCADE');
    // The daily reminder's day; null for one a supervisor sent at once.
    t.date('day');
    t.uuid('requested_by').references('users.id').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    // Set when the notifier handled it: mailed, or dropped because the holder answered or the key audit closed.
    t.timestamp('done_at', { useTz: true });
    t.unique(['campaign_holder_id', 'day']);
  });
  await knex.schema.createTable('key_audit_replaced_links', (t) => {
    t.string('token_hash', 64).primary();
    t.uuid('campaign_holder_id').notNullable().references('key_campaign_holders.id').onDelete('CASCADE');
    t.timestamp('replaced_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.schema.alterTable('key_request_links', (t) => {
    t.timestamp('sent_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('replaced_at', { useTz: true });
  });
  await knex.raw(`UPDATE key_request_links SET sent_at = expires_at - interval '72 hours'`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('key_request_links', (t) => {
    t.dropColumn('replaced_at');
    t.dropColumn('sent_at');
  });
  await knex.schema.dropTable('key_audit_replaced_links');
  await knex.schema.dropTable('key_audit_reminders');
  await knex.schema.alterTable('key_campaign_holders', (t) => {
    t.dropColumn('reminders');
    t.dropColumn('mailed_at');
  });
  await knex.schema.alterTable('key_campaigns', (t) => {
    t.dropColumn('closed_by');
    t.dropColumn('closed_at');
  });
}
