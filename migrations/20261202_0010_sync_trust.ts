import type { Knex } from 'knex';
import { loadConfig } from '../server/config';
import { createSealer, type Sealer } from '../server/services/secrets';
import { pinSizesContext } from '../server/services/pinSizes';

/**
 * The server decides what a synced record means (reliability.md T4, T9):
 * - cores remember the door they were planned for, so an install elsewhere shows as a mismatch;
 * - installs keep that planned door, the technician's reason and the office's review;
 * - per-part pin sizes leave completions.attempts and are sealed in pin_sizes_enc (they rebuild bittings).
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('cores', (t) => {
    t.uuid('planned_door_id').references('doors.id').onDelete('SET NULL');
  });
  await knex.raw('update cores set planned_door_id = door_id');
  await knex.schema.alterTable('installs', (t) => {
    t.uuid('planned_door_id').references('doors.id').onDelete('SET NULL');
    t.boolean('door_mismatch').notNullable().defaultTo(false);
    t.text('mismatch_reason');
    t.uuid('reviewed_by').references('users.id').onDelete('SET NULL');
    t.timestamp('reviewed_at', { useTz: true });
  });
  await knex.raw('CREATE INDEX installs_mismatch_open ON installs (installed_at) WHERE door_mismatch AND reviewed_at IS NULL');
  await knex.schema.alterTable('completions', (t) => {
    t.text('pin_sizes_enc');
  });
  // Rows written before this migration keep their sizes in plain JSON: seal them now.
  let sealer: Sealer | undefined;
  for (;;) {
    const rows = (await knex('completions').whereNull('pin_sizes_enc').whereRaw('jsonb_path_exists(attempts, ?::jsonpath)', ['$[*].steps[*].size ? (@ != null)']).limit(500).select('id', 'attempts')) as { id: string; attempts: Attempts }[];
    if (!rows.length) break;
    sealer ??= createSealer(loadConfig().dataKey);
    for (const r of rows) {
      await knex('completions').where({ id: r.id }).update({ attempts: JSON.stringify(strip(r.attempts)), pin_sizes_enc: sealer.seal(JSON.stringify(sizesOf(r.attempts)), pinSizesContext(r.id)) });
    }
  }
}

type Attempts = { steps: { size: number | null }[] }[];
const sizesOf = (a: Attempts) => a.map((x) => x.steps.map((s) => s.size));
const strip = (a: Attempts) => a.map((x) => ({ ...x, steps: x.steps.map((s) => ({ ...s, size: null })) }));

export async function down(knex: Knex): Promise<void> {
  let sealer: Sealer | undefined;
  for (;;) {
    const rows = (await knex('completions').whereNotNull('pin_sizes_enc').limit(500).select('id', 'attempts', 'pin_sizes_enc')) as { id: string; attempts: Attempts; pin_sizes_enc: string }[];
    if (!rows.length) break;
    sealer ??= createSealer(loadConfig().dataKey);
    for (const r of rows) {
      const sizes = JSON.parse(sealer.open(r.pin_sizes_enc, pinSizesContext(r.id))) as (number | null)[][];
      const attempts = r.attempts.map((x, i) => ({ ...x, steps: x.steps.map((s, j) => ({ ...s, size: sizes[i]?.[j] ?? null })) }));
      await knex('completions').where({ id: r.id }).update({ attempts: JSON.stringify(attempts), pin_sizes_enc: null });
    }
  }
  await knex.schema.alterTable('completions', (t) => t.dropColumn('pin_sizes_enc'));
  await knex.raw('DROP INDEX IF EXISTS installs_mismatch_open');
  await knex.schema.alterTable('installs', (t) => {
    t.dropColumn('planned_door_id');
    t.dropColumn('door_mismatch');
    t.dropColumn('mismatch_reason');
    t.dropColumn('reviewed_by');
    t.dropColumn('reviewed_at');
  });
  await knex.schema.alterTable('cores', (t) => t.dropColumn('planned_door_id'));
}
