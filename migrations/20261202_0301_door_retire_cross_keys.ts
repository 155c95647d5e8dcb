import type { Knex } from 'knex';

/**
 * Doors can be retired (kept for their history, left out of lists and new work orders), and a
 * core can take a second change key for its door (cross-keyed in a work order), marked per link.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('doors', (t) => {
    t.timestamp('retired_at', { useTz: true });
  });
  await knex.schema.alterTable('core_keys', (t) => {
    t.boolean('cross_keyed').notNullable().defaultTo(false);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('core_keys', (t) => {
    t.dropColumn('cross_keyed');
  });
  await knex.schema.alterTable('doors', (t) => {
    t.dropColumn('retired_at');
  });
}
