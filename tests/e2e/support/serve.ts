/** The server the browser tests talk to: a fresh demo seed in the throw-away database, then the real app. */
import { createDb, migrateLatest } from '../../../server/db';
import { isEmpty, seedDemo } from '../../../server/seed/demo';

const db = createDb(process.env.DATABASE_URL ?? '');
await migrateLatest(db);
if (await isEmpty(db)) await seedDemo(db);
await db.destroy();
await import('../../../server/index');
