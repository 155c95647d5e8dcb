import { Router } from 'express';
import type { Knex } from 'knex';
import type { Health } from '../../shared/schemas/auth';
import { RETRY_AFTER_SECONDS } from '../errors';
import { databaseHealth } from '../services/health';

const version = process.env.npm_package_version ?? '0.1.0';

export function healthRouter(db: Knex): Router {
  const router = Router();
  router.get('/health', async (_req, res) => {
    const database = await databaseHealth(db);
    const body: Health = { status: database.state === 'up' ? 'ok' : 'degraded', version, time: new Date().toISOString(), database };
    // 503 takes the instance out of a load balancer's rotation while its database is away (RFC 9110 15.6.4).
    if (database.state !== 'up') res.set('Retry-After', String(RETRY_AFTER_SECONDS));
    res.status(database.state === 'up' ? 200 : 503).json(body);
  });
  return router;
}
