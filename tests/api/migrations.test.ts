// Migrations run down and up again on a fresh database, leaving the same schema (common practice:
// every migration has a working down(); DEVELOPERS.md, "typed up/down").
import { randomBytes } from 'node:crypto';
import { readdirSync } from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import type { Knex } from 'knex';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { createDb, type Db } from '../../server/db';

const clusterUrl = process.env.CW_CLUSTER_URL;
if (!clusterUrl) throw new Error('CW_CLUSTER_URL is not set (npm test -- api sets it)');
const name = `corewright_migrations_${randomBytes(5).toString('hex')}`;
const url = new URL(clusterUrl);
url.pathname = `/${name}`;

/**
 * The files of migrations/, as knex's own file source lists them (sorted by name), loaded through
 * vitest's transform: Node 20 cannot import a .ts file itself (scripts/test.ts runs knex under tsx).
 */
const dir = path.resolve(import.meta.dirname, '../../migrations');
const migrationSource: Knex.MigrationSource<string> = {
  getMigrations: () => Promise.resolve(readdirSync(dir).filter((f) => f.endsWith('.ts') && !f.endsWith('.test.ts')).sort()),
  getMigrationName: (file) => file,
  getMigration: async (file) => (await import(/* @vite-ignore */ pathToFileURL(path.join(dir, file)).href)) as Knex.Migration,
};
const opts = { migrationSource };

let admin: Db;
let db: Db;

async function appTables(): Promise<string[]> {
  return ((await db('pg_tables').where({ schemaname: 'public' }).whereNot('tablename', 'like', 'knex_%').orderBy('tablename').pluck('tablename')) as string[]).sort();
}
/** The schema as information_schema tells it: tables, columns, types, defaults; and the sequences. */
async function schema(): Promise<string[]> {
  const cols = await db('information_schema.columns')
    .where({ table_schema: 'public' })
    .whereNot('table_name', 'like', 'knex_%')
    .orderBy(['table_name', 'column_name'])
    .select('table_name', 'column_name', 'data_type', 'is_nullable', 'column_default', 'character_maximum_length');
  const seqs = await db('information_schema.sequences').where({ sequence_schema: 'public' }).whereNot('sequence_name', 'like', 'knex_%').orderBy('sequence_name').pluck('sequence_name');
  const indexes = await db('pg_indexes').where({ schemaname: 'public' }).whereNot('tablename', 'like', 'knex_%').orderBy('indexname').pluck('indexdef');
  const cons = await db('information_schema.table_constraints').where({ table_schema: 'public' }).whereNot('table_name', 'like', 'knex_%').orderBy(['table_name', 'constraint_type']).select('table_name', 'constraint_type');
  return [...cols.map((c) => JSON.stringify(c)), ...seqs.map((s: string) => `sequence ${s}`), ...cons.map((c) => `constraint ${c.table_name} ${c.constraint_type}`), ...indexes.map((i: string) => `index ${i}`)];
}

beforeAll(async () => {
  admin = createDb(clusterUrl);
  await admin.raw(`create database "${name}"`);
  db = createDb(url.toString());
});
afterAll(async () => {
  await db?.destroy();
  await admin?.raw(`drop database if exists "${name}" with (force)`);
  await admin?.destroy();
});

describe('migrations run down and up again', () => {
  let first: string[];
  let firstSchema: string[];

  test('latest on an empty database creates the app tables (knex migrations; DEVELOPERS.md)', async () => {
    expect(await appTables()).toEqual([]);
    const [, applied] = (await db.migrate.latest(opts)) as [number, string[]];
    // every file in migrations/ ran, in name order (the names knex records are the file names)
    expect(applied).toEqual(await migrationSource.getMigrations([]));
    expect(applied.length).toBeGreaterThanOrEqual(3);
    first = await appTables();
    expect(first).toEqual(expect.arrayContaining(['users', 'sessions', 'audit_events', 'key_systems', 'keys', 'doors', 'cores', 'core_keys', 'work_orders', 'completions', 'installs', 'devices', 'invitations']));
    firstSchema = await schema();
    expect(firstSchema).toContain('sequence core_tag_seq');
    expect(firstSchema.some((s) => s.startsWith('index '))).toBe(true);
  });

  test('rolling back every migration leaves no app table, sequence or index (common practice: down() undoes up())', async () => {
    const [, undone] = (await db.migrate.rollback(opts, true)) as [number, string[]];
    expect(undone.length).toBeGreaterThanOrEqual(3);
    expect(await appTables()).toEqual([]);
    expect(await db('information_schema.sequences').where({ sequence_schema: 'public' }).whereNot('sequence_name', 'like', 'knex_%').pluck('sequence_name')).toEqual([]);
    expect(await db('pg_indexes').where({ schemaname: 'public' }).whereNot('tablename', 'like', 'knex_%').pluck('indexname')).toEqual([]);
    const [done, pending] = (await db.migrate.list(opts)) as [unknown[], unknown[]];
    expect(done).toEqual([]);
    expect(pending.length).toBeGreaterThanOrEqual(3);
  });

  test('latest again brings back the same tables and the same schema (common practice: up, down, up is the same schema)', async () => {
    await db.migrate.latest(opts);
    expect(await appTables()).toEqual(first);
    expect(await schema()).toEqual(firstSchema);
  });
});
