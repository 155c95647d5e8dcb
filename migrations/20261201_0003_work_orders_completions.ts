import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('devices', (t) => {
    t.uuid('id').primary(); // made on the tablet
    t.uuid('user_id').notNullable().references('users.id').onDelete('CASCADE');
    t.string('label', 120);
    t.text('escrow_key_enc').notNullable(); // wraps the tablet's outbox key, for recovery after a lockout
    t.timestamp('first_seen_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('last_seen_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('last_sync_at', { useTz: true });
    t.integer('last_sync_waiting');
    t.timestamp('revoked_at', { useTz: true });
    t.uuid('revoked_by').references('users.id').onDelete('SET NULL');
    t.index(['user_id']);
  });
  await knex.schema.createTable('work_orders', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.increments('number', { primaryKey: false });
    t.string('title', 120).notNullable();
    t.string('purpose', 20).notNullable().checkIn(['new-building', 'lost-key-rekey', 'move', 'maintenance', 'other'], 'work_orders_purpose_check');
    t.uuid('key_system_id').notNullable().references('key_systems.id').onDelete('RESTRICT');
    t.uuid('assignee_id').references('users.id').onDelete('SET NULL');
    t.date('due_date');
    t.string('status', 12).notNullable().defaultTo('draft').checkIn(['draft', 'assigned', 'in-progress', 'done', 'cancelled'], 'work_orders_status_check');
    t.text('notes');
    t.uuid('created_by').references('users.id').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['assignee_id', 'status']);
  });
  await knex.schema.createTable('work_order_cores', (t) => {
    t.uuid('work_order_id').notNullable().references('work_orders.id').onDelete('CASCADE');
    t.uuid('core_id').notNullable().references('cores.id').onDelete('CASCADE');
    t.integer('position').notNullable();
    t.primary(['work_order_id', 'core_id']);
    t.index(['core_id']);
  });
  await knex.schema.createTable('completions', (t) => {
    t.uuid('id').primary(); // the tablet's client id: the idempotency key
    t.uuid('core_id').notNullable().references('cores.id').onDelete('RESTRICT');
    t.uuid('work_order_id').references('work_orders.id').onDelete('SET NULL');
    t.uuid('technician_id').notNullable().references('users.id').onDelete('RESTRICT');
    t.uuid('device_id').references('devices.id').onDelete('SET NULL');
    t.timestamp('started_at', { useTz: true }).notNullable();
    t.timestamp('finished_at', { useTz: true }).notNullable();
    t.string('result', 8).notNullable().checkIn(['passed', 'failed'], 'completions_result_check');
    t.integer('attempt_count').notNullable();
    t.integer('failed_checks').notNullable();
    t.jsonb('attempts').notNullable();
    t.text('notes');
    t.string('payload_hash', 64).notNullable();
    t.timestamp('received_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['finished_at']);
    t.index(['work_order_id', 'finished_at']);
    t.index(['technician_id', 'finished_at']);
    t.index(['core_id']);
    t.index(['result', 'finished_at']);
  });
  await knex.schema.createTable('installs', (t) => {
    t.uuid('id').primary(); // the tablet's client id
    t.uuid('core_id').notNullable().references('cores.id').onDelete('RESTRICT');
    t.uuid('door_id').notNullable().references('doors.id').onDelete('RESTRICT');
    t.string('removed_core_tag', 24);
    t.uuid('removed_core_id').references('cores.id').onDelete('SET NULL');
    t.uuid('installed_by').notNullable().references('users.id').onDelete('RESTRICT');
    t.uuid('device_id').references('devices.id').onDelete('SET NULL');
    t.timestamp('installed_at', { useTz: true }).notNullable();
    t.text('notes');
    t.string('payload_hash', 64).notNullable();
    t.timestamp('received_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['door_id', 'installed_at']);
    t.index(['core_id']);
  });
  await knex.schema.createTable('invitations', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('user_id').notNullable().references('users.id').onDelete('CASCADE');
    t.string('token_hash', 64).notNullable().unique();
    t.timestamp('expires_at', { useTz: true }).notNullable();
    t.timestamp('used_at', { useTz: true });
    t.uuid('created_by').references('users.id').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('invitations');
  await knex.schema.dropTable('installs');
  await knex.schema.dropTable('completions');
  await knex.schema.dropTable('work_order_cores');
  await knex.schema.dropTable('work_orders');
  await knex.schema.dropTable('devices');
}
