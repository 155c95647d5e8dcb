import { Router } from 'express';
import type { Knex } from 'knex';
import type { Health } from '../../shared/schemas/auth';

const version = process.env.npm_package_version ?? '0.1.0';

export function healthRouter(db: Knex): Router {
  const router = Router();
  router.get('/health', async (_req, res) => {
    const started = performance.now();
    let database: Health['database'] = { state: 'down', latencyMs: null, migrations: 'unknown' };
    try {
      await db.raw('select 1');
      const latencyMs = Math.round((performance.now() - started) * 10) / 10;
      const [, pending] = (await db.migrate.list()) as [unknown[], unknown[]];
      database = { state: 'up', latencyMs, migrations: pending.length === 0 ? 'current' : 'pending' };
    } catch {
      // reported as down below; health must answer even when the database does not
    }
    const body: Health = { status: database.state === 'up' ? 'ok' : 'degraded', version, time: new Date().toISOString(), database };
    res.status(200).json(body);
  });
  return router;
}
