import { Router } from 'express';
import type { Knex } from 'knex';
import type { Health } from '../../shared/schemas/auth';
import { RETRY_AFTER_SECONDS } from '../errors';

const version = process.env.npm_package_version ?? '0.1.0';
/** A database that does not answer within this is as good as down for a load balancer. */
const CHECK_TIMEOUT_MS = 3000;

function within<T>(promise: Promise<T>, ms: number): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  return Promise.race([promise, new Promise<never>((_, reject) => (timer = setTimeout(() => reject(new Error('health check timed out')), ms)))]).finally(() => clearTimeout(timer));
}

export function healthRouter(db: Knex): Router {
  const router = Router();
  router.get('/health', async (_req, res) => {
    const started = performance.now();
    let database: Health['database'] = { state: 'down', latencyMs: null, migrations: 'unknown' };
    try {
      await within(db.raw('select 1'), CHECK_TIMEOUT_MS);
      const latencyMs = Math.round((performance.now() - started) * 10) / 10;
      const [, pending] = (await within(db.migrate.list(), CHECK_TIMEOUT_MS)) as [unknown[], unknown[]];
      database = { state: 'up', latencyMs, migrations: pending.length === 0 ? 'current' : 'pending' };
    } catch {
      // reported as down below; health must answer even when the database does not
    }
    const body: Health = { status: database.state === 'up' ? 'ok' : 'degraded', version, time: new Date().toISOString(), database };
    // 503 takes the instance out of a load balancer's rotation while its database is away (RFC 9110 15.6.4).
    if (database.state !== 'up') res.set('Retry-After', String(RETRY_AFTER_SECONDS));
    res.status(database.state === 'up' ? 200 : 503).json(body);
  });
  return router;
}
