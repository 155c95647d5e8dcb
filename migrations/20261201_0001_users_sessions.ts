import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('users', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.string('email', 254).notNullable().unique();
    t.string('name', 120).notNullable();
    t.string('role', 20).notNullable().checkIn(['technician', 'supervisor', 'admin'], 'users_role_check');
    t.text('password_hash'); // null until an invited user sets a password
    t.boolean('active').notNullable().defaultTo(true);
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.schema.createTable('sessions', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('user_id').notNullable().references('users.id').onDelete('CASCADE');
    t.string('refresh_hash', 64).notNullable();
    t.uuid('device_id');
    t.string('user_agent', 300);
    t.string('ip', 64);
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('refreshed_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('expires_at', { useTz: true }).notNullable();
    t.timestamp('revoked_at', { useTz: true });
    t.string('revoked_reason', 40);
    t.index(['user_id']);
  });
  await knex.schema.createTable('audit_events', (t) => {
    t.bigIncrements('id');
    t.timestamp('at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.uuid('actor_id').references('users.id').onDelete('SET NULL');
    t.string('actor_email', 254);
    t.string('action', 60).notNullable();
    t.string('target_type', 40);
    t.string('target_id', 80);
    t.string('ip', 64);
    t.string('user_agent', 300);
    t.jsonb('details').notNullable().defaultTo('{}');
    t.index(['at']);
    t.index(['action', 'at']);
    t.index(['actor_id', 'at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('audit_events');
  await knex.schema.dropTable('sessions');
  await knex.schema.dropTable('users');
}
