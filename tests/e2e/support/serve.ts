/** The server the browser tests talk to: a fresh demo seed in the throw-away database, then the real app. */
import { createDb, migrateLatest } from '../../../server/db';
import { isEmpty, seedDemo } from '../../../server/seed/demo';
import { loadConfig } from '../../../server/config';
import { createSealer } from '../../../server/services/secrets';

const db = createDb(process.env.DATABASE_URL ?? '');
await migrateLatest(db);
if (await isEmpty(db)) await seedDemo(db, createSealer(loadConfig().dataKey));
process.env.CW_FAKE_SMTP = '1';
await db.destroy();
await import('../../../server/index');
