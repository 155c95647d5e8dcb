/** `npm run db:migrate [-- down|up|list]` against DATABASE_URL. */
import { createDb } from '../server/db';

const db = createDb(process.env.DATABASE_URL ?? '');
const verb = process.argv[2] ?? 'latest';
try {
  if (verb === 'down') console.log(await db.migrate.rollback(undefined, true));
  else if (verb === 'list') console.log(await db.migrate.list());
  else console.log(await db.migrate.latest());
} finally {
  await db.destroy();
}
