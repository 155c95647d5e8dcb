/** The database as a load balancer needs to know it: up, how fast, and whether migrations are current. */
import type { Knex } from 'knex';
import type { Health } from '../../shared/schemas/auth';

/** A database that does not answer within this is as good as down for a load balancer. */
const CHECK_TIMEOUT_MS = 3000;

function within<T>(promise: Promise<T>, ms: number): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  return Promise.race([promise, new Promise<never>((_, reject) => (timer = setTimeout(() => reject(new Error('health check timed out')), ms)))]).finally(() => clearTimeout(timer));
}

export async function databaseHealth(db: Knex): Promise<Health['database']> {
  const started = performance.now();
  try {
    await within(db.raw('select 1'), CHECK_TIMEOUT_MS);
    const latencyMs = Math.round((performance.now() - started) * 10) / 10;
    const [, pending] = (await within(db.migrate.list(), CHECK_TIMEOUT_MS)) as [unknown[], unknown[]];
    return { state: 'up', latencyMs, migrations: pending.length === 0 ? 'current' : 'pending' };
  } catch {
    // health must answer even when the database does not
    return { state: 'down', latencyMs: null, migrations: 'unknown' };
  }
}
