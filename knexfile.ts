import type { Knex } from 'knex';
import path from 'node:path';

/** One configuration for every environment: the scripts set DATABASE_URL. */
export function knexConfig(databaseUrl = process.env.DATABASE_URL): Knex.Config {
  if (!databaseUrl) throw new Error('DATABASE_URL is not set (npm start and npm test set it for you)');
  return {
    client: 'pg',
    connection: databaseUrl,
    pool: { min: 0, max: Number(process.env.CW_DB_POOL ?? 10) },
    migrations: {
      directory: path.join(import.meta.dirname, 'migrations'),
      extension: 'ts',
      loadExtensions: ['.ts'],
      tableName: 'knex_migrations',
    },
  };
}

export default { development: knexConfig, test: knexConfig, production: knexConfig };
