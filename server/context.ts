import type { Knex } from 'knex';
import type { Config } from './config';
import type { Mailer } from './services/mail';
import type { Sealer } from './services/secrets';

/** What every router and service needs: the database, the config, the sealer for bittings, the mailer. */
export interface Ctx {
  db: Knex;
  config: Config;
  sealer: Sealer;
  mailer: Mailer;
}
