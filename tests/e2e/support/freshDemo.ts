/**
 * Every spec starts from the untouched demo campus: the specs share one server and database,
 * and one spec's edits (a retired door, a replaced key, an acknowledged finding) must not
 * decide another's outcome. Call `test.beforeAll(freshDemo)` first in a spec file.
 */
import { createDb } from '../../../server/db';
import { loadConfig } from '../../../server/config';
import { seedDemo } from '../../../server/seed/demo';
import { createSealer } from '../../../server/services/secrets';

export async function freshDemo(): Promise<void> {
  const db = createDb(process.env.DATABASE_URL ?? '');
  try {
    const tables = (await db('pg_tables').where({ schemaname: 'public' }).whereNot('tablename', 'like', 'knex_%').pluck('tablename')) as string[];
    // The server may be sending owed mail under a row lock (services/notifier.ts): retry a deadlock.
    for (let attempt = 1; ; attempt++) {
      try {
        await db.raw(`TRUNCATE ${tables.map((t) => `"${t}"`).join(', ')} RESTART IDENTITY CASCADE`);
        break;
      } catch (err) {
        if ((err as { code?: string }).code !== '40P01' || attempt >= 5) throw err;
        await new Promise((r) => setTimeout(r, 100 * attempt));
      }
    }
    await seedDemo(db, createSealer(loadConfig().dataKey));
  } finally {
    await db.destroy();
  }
}
