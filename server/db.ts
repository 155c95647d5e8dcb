import knex, { type Knex } from 'knex';
import pg from 'pg';
import { knexConfig } from '../knexfile';

// Dates and timestamps come back as JS Date; bigint counts (COUNT(*)) as numbers.
pg.types.setTypeParser(pg.types.builtins.INT8, (v) => Number(v));

export type Db = Knex;

export function createDb(databaseUrl: string): Db {
  return knex(knexConfig(databaseUrl));
}

export async function migrateLatest(db: Db): Promise<string[]> {
  const [, names] = (await db.migrate.latest()) as [number, string[]];
  return names;
}
