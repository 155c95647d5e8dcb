/** The Express application. `createApp()` wires routes to a database handle; index.ts only listens. */
import express, { type Express } from 'express';
import helmet from 'helmet';
import type { Knex } from 'knex';
import type { Config } from './config';
import type { Ctx } from './context';
import type { FakeSmtp } from './dev/fakeSmtp';
import { errorHandler, notFoundApi } from './errors';
import { requireAuth } from './middleware/auth';
import { auditEventsRouter } from './routes/auditEvents';
import { authRouter } from './routes/auth';
import { completionsRouter } from './routes/completions';
import { installsRouter } from './routes/installs';
import { coresRouter } from './routes/cores';
import { devRouter } from './routes/dev';
import { devicesRouter } from './routes/devices';
import { doorsRouter } from './routes/doors';
import { healthRouter } from './routes/health';
import { holdersRouter } from './routes/holders';
import { keyAuditLinksRouter, keyAuditsRouter } from './routes/keyAudits';
import { keyExposureRouter } from './routes/keyExposure';
import { keyIssuesRouter } from './routes/keyIssues';
import { keyReissueRouter } from './routes/keyReissue';
import { keyRequestLinksRouter, keyRequestsRouter } from './routes/keyRequests';
import { keySystemsRouter } from './routes/keySystems';
import { profilesRouter } from './routes/profiles';
import { syncRouter } from './routes/sync';
import { usersRouter } from './routes/users';
import { workOrdersRouter } from './routes/workOrders';
import { createMailer, type Mailer } from './services/mail';
import { createSealer } from './services/secrets';
import { staticRouter } from './static';

export interface AppDeps {
  db: Knex;
  config: Config;
  mailer?: Mailer;
  /** The development mailbox; never in production. */
  smtp?: FakeSmtp | undefined;
  log?: (msg: string, err: unknown) => void;
}

export function createApp({ db, config, mailer, smtp, log }: AppDeps): Express {
  const ctx: Ctx = { db, config, sealer: createSealer(config.dataKey), mailer: mailer ?? createMailer(config) };
  const app = express();
  app.disable('x-powered-by');
  // Who may set X-Forwarded-For: by default only a proxy on this machine (config.trustProxy, CW_TRUST_PROXY).
  app.set('trust proxy', config.trustProxy);
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
  // The sync route takes larger batches and parses its own body; every other body is capped at 100 KB.
  api.use((req, res, next) => (req.path === '/sync' ? next() : express.json({ limit: '100kb' })(req, res, next)));
  api.use(healthRouter(db));
  api.use(authRouter(db, config));
  // The development mailbox exists only when npm start runs the fake SMTP outside production; otherwise 404.
  if (smtp && config.env !== 'production') api.use(devRouter(smtp));
  else api.use('/dev', notFoundApi);
  // The authoriser's and the holder's mailed links need no sign-in: the single-use token is the credential.
  api.use(keyRequestLinksRouter(ctx));
  api.use(keyAuditLinksRouter(ctx));
  api.use(requireAuth(db, config));
  // Every router below states its roles with allow(...).
  api.use(usersRouter(ctx));
  api.use(auditEventsRouter(ctx));
  api.use(profilesRouter(ctx));
  api.use(keySystemsRouter(ctx));
  api.use(doorsRouter(ctx));
  api.use(coresRouter(ctx));
  api.use(workOrdersRouter(ctx));
  api.use(syncRouter(ctx));
  api.use(completionsRouter(ctx));
  api.use(installsRouter(ctx));
  api.use(devicesRouter(ctx));
  api.use(holdersRouter(ctx));
  api.use(keyIssuesRouter(ctx));
  api.use(keyExposureRouter(ctx));
  api.use(keyRequestsRouter(ctx));
  api.use(keyAuditsRouter(ctx));
  api.use(keyReissueRouter(ctx));
  api.use(notFoundApi);
  app.use('/api', api);

  if (config.staticDir) app.use(staticRouter(config.staticDir));
  app.use(errorHandler(log));
  return app;
}
