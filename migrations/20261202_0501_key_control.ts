import type { Knex } from 'knex';

/**
 * Key control: the people who carry keys (holders, by department, with who may authorise
 * keys for them), requests and their decisions, every key copy issued individually (copy
 * numbers unique per key), and lost or stolen reports with the exposure computed then.
 * No table here holds a bitting: a key copy is named by its key and copy number.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('departments', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.string('name', 120).notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw('CREATE UNIQUE INDEX departments_name_unique ON departments (lower(name))');
  await knex.schema.createTable('department_authorisers', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('department_id').notNullable().references('departments.id').onDelete('CASCADE');
    t.string('name', 120).notNullable();
    t.string('email', 254).notNullable();
    t.unique(['department_id', 'email']);
  });
  await knex.schema.createTable('key_holders', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.string('name', 120).notNullable();
    t.uuid('department_id').notNullable().references('departments.id').onDelete('RESTRICT');
    t.string('email', 254);
    t.string('badge_id', 40).unique();
    t.string('status', 10).notNullable().defaultTo('active').checkIn(['active', 'leaving', 'left'], 'key_holders_status_check');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['department_id']);
  });
  await knex.schema.createTable('key_requests', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.integer('number').notNullable().unique();
    t.uuid('holder_id').notNullable().references('key_holders.id').onDelete('RESTRICT');
    t.uuid('key_system_id').notNullable().references('key_systems.id').onDelete('RESTRICT');
    t.specificType('door_ids', 'uuid[]').notNullable();
    t.text('reason').notNullable();
    t.uuid('proposed_key_id').references('keys.id').onDelete('SET NULL');
    t.uuid('key_id').notNullable().references('keys.id').onDelete('RESTRICT');
    t.string('status', 10).notNullable().defaultTo('pending').checkIn(['pending', 'approved', 'refused'], 'key_requests_status_check');
    t.string('decided_by_name', 120);
    t.string('decided_by_email', 254);
    t.uuid('decided_by_user_id').references('users.id').onDelete('SET NULL');
    t.text('decision_note');
    t.timestamp('decided_at', { useTz: true });
    t.uuid('created_by').references('users.id').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw('CREATE SEQUENCE key_request_number_seq START 1');
  // The authoriser's mailed link: only the token's SHA-256 is stored; single use, expiring.
  await knex.schema.createTable('key_request_links', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('request_id').notNullable().references('key_requests.id').onDelete('CASCADE');
    t.uuid('authoriser_id').notNullable().references('department_authorisers.id').onDelete('CASCADE');
    t.string('token_hash', 64).notNullable().unique();
    t.timestamp('expires_at', { useTz: true }).notNullable();
    t.timestamp('used_at', { useTz: true });
  });
  await knex.schema.createTable('key_issues', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('holder_id').notNullable().references('key_holders.id').onDelete('RESTRICT');
    t.uuid('key_id').notNullable().references('keys.id').onDelete('RESTRICT');
    t.integer('copy_number').notNullable();
    t.uuid('request_id').references('key_requests.id').onDelete('SET NULL');
    t.uuid('issued_by').references('users.id').onDelete('SET NULL');
    t.timestamp('issued_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.date('due_date');
    t.string('ack_name', 120).notNullable();
    t.text('ack_signature');
    t.string('status', 10).notNullable().defaultTo('out').checkIn(['out', 'returned', 'lost', 'stolen'], 'key_issues_status_check');
    t.timestamp('returned_at', { useTz: true });
    t.uuid('returned_to').references('users.id').onDelete('SET NULL');
    // Two parallel issues of one key cannot take the same copy number (the service retries).
    t.unique(['key_id', 'copy_number']);
    t.index(['holder_id']);
  });
  await knex.schema.createTable('key_reports', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('issue_id').notNullable().references('key_issues.id').onDelete('RESTRICT');
    t.string('kind', 10).notNullable().checkIn(['lost', 'stolen'], 'key_reports_kind_check');
    t.text('note');
    t.jsonb('exposure').notNullable();
    t.string('status', 10).notNullable().defaultTo('open').checkIn(['open', 'closed'], 'key_reports_status_check');
    t.uuid('work_order_id').references('work_orders.id').onDelete('SET NULL');
    t.uuid('created_by').references('users.id').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('closed_at', { useTz: true });
    t.unique(['issue_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('key_reports');
  await knex.schema.dropTable('key_issues');
  await knex.schema.dropTable('key_request_links');
  await knex.raw('DROP SEQUENCE IF EXISTS key_request_number_seq');
  await knex.schema.dropTable('key_requests');
  await knex.schema.dropTable('key_holders');
  await knex.schema.dropTable('department_authorisers');
  await knex.schema.dropTable('departments');
}
