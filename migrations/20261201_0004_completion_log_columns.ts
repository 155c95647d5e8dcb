import type { Knex } from 'knex';

/**
 * The completion log keeps the door, core tag and technician name as they were when the
 * core was finished (a record, like a signed sheet), which also lets the log sort on them
 * from an index at 100,000 rows.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('completions', (t) => {
    t.uuid('door_id').references('doors.id').onDelete('SET NULL');
    t.string('door_label', 40);
    t.string('core_tag', 24);
    t.string('technician_name', 120);
  });
  await knex.raw(`update completions cp set door_id = c.door_id, door_label = d.label, core_tag = c.tag, technician_name = u.name
                  from cores c left join doors d on d.id = c.door_id, users u where c.id = cp.core_id and u.id = cp.technician_id`);
  await knex.raw('alter table completions alter column core_tag set not null, alter column technician_name set not null');
  await knex.schema.alterTable('completions', (t) => {
    t.index(['door_label', 'id']);
    t.index(['technician_name', 'id']);
    t.index(['core_tag', 'id']);
    t.index(['door_id', 'finished_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('completions', (t) => {
    t.dropIndex(['door_label', 'id']);
    t.dropIndex(['technician_name', 'id']);
    t.dropIndex(['core_tag', 'id']);
    t.dropIndex(['door_id', 'finished_at']);
    t.dropColumn('door_id');
    t.dropColumn('door_label');
    t.dropColumn('core_tag');
    t.dropColumn('technician_name');
  });
}
