import type { Knex } from 'knex';

// Bittings are stored only as AES-256-GCM ciphertext (server/services/secrets.ts): columns *_enc.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('profiles', (t) => {
    t.string('id', 40).primary();
    t.string('label', 120).notNullable();
    t.jsonb('definition').notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.schema.createTable('key_systems', (t) => {
    t.uuid('id').primary();
    t.string('name', 120).notNullable().unique();
    t.string('profile_id', 40).notNullable();
    t.text('control_enc').notNullable();
    t.text('notes');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.schema.createTable('keys', (t) => {
    t.uuid('id').primary();
    t.uuid('key_system_id').notNullable().references('key_systems.id').onDelete('CASCADE');
    t.string('symbol', 24).notNullable();
    t.string('level', 10).notNullable().checkIn(['ggm', 'gm', 'master', 'change'], 'keys_level_check');
    t.uuid('parent_id').references('keys.id').onDelete('SET NULL');
    t.text('bitting_enc').notNullable();
    t.string('status', 10).notNullable().defaultTo('active').checkIn(['active', 'lost', 'retired'], 'keys_status_check');
    t.boolean('cross_keyed').notNullable().defaultTo(false);
    t.text('notes');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['key_system_id', 'symbol']);
    t.index(['parent_id']);
  });
  await knex.schema.createTable('doors', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.string('site', 80).notNullable();
    t.string('building', 80).notNullable();
    t.string('floor', 20).notNullable().defaultTo('');
    t.string('room', 40).notNullable().defaultTo('');
    t.string('label', 40).notNullable().unique();
    t.boolean('fire_rated').notNullable().defaultTo(false);
    t.uuid('key_system_id').references('key_systems.id').onDelete('SET NULL');
    t.uuid('key_id').references('keys.id').onDelete('SET NULL');
    t.text('notes');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['building']);
  });
  await knex.schema.createTable('cores', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.string('tag', 24).notNullable().unique();
    t.uuid('key_system_id').notNullable().references('key_systems.id').onDelete('RESTRICT');
    t.uuid('door_id').references('doors.id').onDelete('SET NULL');
    t.string('state', 12).notNullable().defaultTo('planned').checkIn(['planned', 'loaded', 'checked', 'capped', 'installed', 'retired'], 'cores_state_check');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['door_id']);
    t.index(['key_system_id']);
  });
  await knex.schema.createTable('core_keys', (t) => {
    t.uuid('core_id').notNullable().references('cores.id').onDelete('CASCADE');
    t.uuid('key_id').notNullable().references('keys.id').onDelete('RESTRICT');
    t.primary(['core_id', 'key_id']);
    t.index(['key_id']);
  });
  await knex.raw('CREATE SEQUENCE core_tag_seq START 1001');
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP SEQUENCE IF EXISTS core_tag_seq');
  await knex.schema.dropTable('core_keys');
  await knex.schema.dropTable('cores');
  await knex.schema.dropTable('doors');
  await knex.schema.dropTable('keys');
  await knex.schema.dropTable('key_systems');
  await knex.schema.dropTable('profiles');
}
