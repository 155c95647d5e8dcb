/**
 * The invented demo scenario for `npm start`. Local demo only: it refuses to run with
 * NODE_ENV=production, and the demo accounts share one published password.
 */
import type { Knex } from 'knex';
import { hashPassword } from '../services/passwords';

export const DEMO_PASSWORD = 'corewright-demo';
export const demoUsers = [
  { email: 'tech@demo.corewright.test', name: 'Robin Tech (demo)', role: 'technician' },
  { email: 'lead@demo.corewright.test', name: 'Sam Lead (demo)', role: 'supervisor' },
  { email: 'admin@demo.corewright.test', name: 'Alex Admin (demo)', role: 'admin' },
] as const;

export async function isEmpty(db: Knex): Promise<boolean> {
  const row = await db('users').count<{ count: number }[]>({ count: '*' }).first();
  return Number(row?.count ?? 0) === 0;
}

export async function seedDemo(db: Knex): Promise<void> {
  if (process.env.NODE_ENV === 'production') throw new Error('The demo seed refuses to run with NODE_ENV=production: its accounts share a published password.');
  const hash = await hashPassword(DEMO_PASSWORD);
  await db.transaction(async (trx) => {
    await trx('users').insert(demoUsers.map((u) => ({ ...u, password_hash: hash })));
  });
}
