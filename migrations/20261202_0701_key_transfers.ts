import type { Knex } from 'knex';

/**
 * Key control, transfers: a key copy passed from one holder to another in one step. The old
 * issue record closes as `transferred` (when, and the new record it became); the new record keeps
 * the copy number, so a copy number is unique per key only among records not transferred (the
 * copy itself is the same piece of metal, held by one holder at a time).
 */
export async function up(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE key_issues DROP CONSTRAINT key_issues_status_check');
  await knex.raw('ALTER TABLE key_issues ALTER COLUMN status TYPE varchar(12)');
  await knex.raw(`ALTER TABLE key_issues ADD CONSTRAINT key_issues_status_check CHECK (status IN ('out', 'returned', 'lost', 'stolen', 'transferred'))`);
  await knex.schema.alterTable('key_issues', (t) => {
    t.timestamp('transferred_at', { useTz: true });
    t.dropUnique(['key_id', 'copy_number']);
  });
  // Checked at commit: the old record closes (pointing at the new id) before the new record, which takes its copy number, is written.
  await knex.raw('ALTER TABLE key_issues ADD COLUMN transferred_to uuid REFERENCES key_issues (id) ON DELETE RESTRICT DEFERRABLE INITIALLY DEFERRED');
  // One record per copy may be live; every transferred record of it points at the next one.
  await knex.raw(`CREATE UNIQUE INDEX key_issues_key_copy_unique ON key_issues (key_id, copy_number) WHERE status <> 'transferred'`);
  await knex.raw('CREATE UNIQUE INDEX key_issues_transferred_to_unique ON key_issues (transferred_to) WHERE transferred_to IS NOT NULL');
  await knex.raw(`ALTER TABLE key_issues ADD CONSTRAINT key_issues_transferred_check CHECK ((status = 'transferred') = (transferred_to IS NOT NULL AND transferred_at IS NOT NULL))`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE key_issues DROP CONSTRAINT key_issues_transferred_check');
  await knex.raw('DROP INDEX key_issues_transferred_to_unique');
  await knex.raw('DROP INDEX key_issues_key_copy_unique');
  // A transferred record shares its copy number with the record it became: the old rule cannot hold both.
  if (await knex('key_issues').where({ status: 'transferred' }).first('id')) throw new Error('Key copies have been transferred: their history cannot be kept under the old one-record-per-copy rule.');
  await knex.schema.alterTable('key_issues', (t) => {
    t.dropColumn('transferred_at');
    t.dropColumn('transferred_to');
    t.unique(['key_id', 'copy_number']);
  });
  await knex.raw('ALTER TABLE key_issues DROP CONSTRAINT key_issues_status_check');
  await knex.raw('ALTER TABLE key_issues ALTER COLUMN status TYPE varchar(10)');
  await knex.raw(`ALTER TABLE key_issues ADD CONSTRAINT key_issues_status_check CHECK (status IN ('out', 'returned', 'lost', 'stolen'))`);
}
