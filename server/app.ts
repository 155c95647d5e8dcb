/** The Express application. `createApp()` wires routes to a database handle; index.ts only listens. */
import express, { type Express } from 'express';
import helmet from 'helmet';
import type { Knex } from 'knex';
import type { Config } from './config';
import { errorHandler, notFoundApi } from './errors';
import { requireAuth } from './middleware/auth';
import { authRouter } from './routes/auth';
import { healthRouter } from './routes/health';
import { staticRouter } from './static';
import { usersRouter } from './routes/users';

export interface AppDeps {
  db: Knex;
  config: Config;
  log?: (msg: string, err: unknown) => void;
}

export function createApp({ db, config, log }: AppDeps): Express {
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');
  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: false,
        directives: {
          'default-src': ["'self'"],
          'script-src': ["'self'"],
          'style-src': ["'self'", "'unsafe-inline'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          'font-src': ["'self'", 'data:'],
          'connect-src': ["'self'"],
          'worker-src': ["'self'"],
          'manifest-src': ["'self'"],
          'media-src': ["'self'", 'blob:'],
          'object-src': ["'none'"],
          'base-uri': ["'self'"],
          'form-action': ["'self'"],
          'frame-ancestors': ["'none'"],
        },
      },
      strictTransportSecurity: { maxAge: 31536000, includeSubDomains: true },
      crossOriginEmbedderPolicy: false,
    }),
  );

  const api = express.Router();
  // Nothing under /api may be cached: answers can carry bittings and personal data.
  api.use((_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });
  api.use(express.json({ limit: '100kb' }));
  api.use(healthRouter(db));
  api.use(authRouter(db, config));
  api.use(requireAuth(db, config));
  // Routers for each resource mount here; each states its roles.
  api.use(usersRouter(db));
  api.use(notFoundApi);
  app.use('/api', api);

  if (config.staticDir) app.use(staticRouter(config.staticDir));
  app.use(errorHandler(log));
  return app;
}
