/**
 * API test harness: the real Express app from createApp() on a loopback port, against the
 * real Postgres database that `npm test` created (DATABASE_URL), reset before each file.
 */
import { randomUUID } from 'node:crypto';
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { createApp } from '../../server/app';
import { loadConfig, type Config } from '../../server/config';
import { createDb, type Db } from '../../server/db';
import { DEMO_PASSWORD, demoUsers, seedDemo, seedUsers } from '../../server/seed/demo';
import { hashPassword } from '../../server/services/passwords';
import { startFakeSmtp, type CapturedMail, type FakeSmtp } from '../../server/dev/fakeSmtp';
import { createSealer, type Sealer } from '../../server/services/secrets';
import { answers, checkAnswer, type Answer } from './responses';

export interface Reply {
  status: number;
  headers: Headers;
  text: string;
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  json: any;
}

export interface CallOptions {
  token?: string | undefined;
  body?: unknown;
  /** Sent as is, with this content type (for malformed JSON and uploads). */
  raw?: string | Buffer | FormData;
  contentType?: string;
  headers?: Record<string, string>;
  /** The response schemas this answer is parsed with (tests/api/responses.ts); a test passes a wrong one to see the check bite. */
  answers?: Record<string, Answer>;
}

export interface Harness {
  db: Db;
  config: Config;
  sealer: Sealer;
  smtp: FakeSmtp;
  /** Mail captured by the fake SMTP server for this address, waiting briefly for it to arrive. */
  mailTo(address: string, count?: number): Promise<CapturedMail[]>;
  /** One request without following redirects (an old path's 308): the status and where it points. */
  unfollowed(method: string, path: string, token?: string, body?: unknown): Promise<{ status: number; location: string | null }>;
  base: string;
  call(method: string, path: string, opts?: CallOptions): Promise<Reply>;
  /** Signs in as a tablet would, naming a device (a fresh one unless given; null for none). */
  signIn(email: string, password?: string, deviceId?: string | null): Promise<{ accessToken: string; refreshToken: string; user: { id: string; role: string } }>;
  tokenFor(role: 'technician' | 'supervisor' | 'admin'): Promise<string>;
  /** resetDatabase() again (with the demo campus when the harness has it), forgetting signed-in tokens. */
  reset(): Promise<void>;
  close(): Promise<void>;
}

let cachedHash: string | undefined;

/**
 * Empties every table but the migration log, then puts back the three demo users, or with
 * `demo` the whole invented demo campus (key system, 60 doors, work orders, history).
 */
export async function resetDatabase(db: Db, opts: { demo?: Sealer } = {}): Promise<void> {
  const tables = (await db('pg_tables').where({ schemaname: 'public' }).whereNot('tablename', 'like', 'knex_%').pluck('tablename')) as string[];
  // The app may still be sending a test's mail in a transaction (services/notifier.ts): a deadlock with it is retried.
  for (let attempt = 1; tables.length; attempt++) {
    try {
      await db.raw(`TRUNCATE ${tables.map((t) => `"${t}"`).join(', ')} RESTART IDENTITY CASCADE`);
      break;
    } catch (err) {
      if ((err as { code?: string }).code !== '40P01' || attempt >= 5) throw err;
      await new Promise((r) => setTimeout(r, 100 * attempt));
    }
  }
  if (opts.demo) return seedDemo(db, opts.demo);
  cachedHash ??= await hashPassword(DEMO_PASSWORD);
  await seedUsers(db, false, cachedHash);
}

export const emailFor = { technician: demoUsers[0].email, supervisor: demoUsers[1].email, admin: demoUsers[2].email } as const;

export async function startHarness(env: Record<string, string> = {}, opts: { demo?: boolean } = {}): Promise<Harness> {
  const smtp = await startFakeSmtp();
  const config = { ...loadConfig({ ...process.env, CW_STATIC_DIR: '', ...env }), smtp: { host: '127.0.0.1', port: smtp.port } };
  const db = createDb(config.databaseUrl);
  const sealer = createSealer(config.dataKey);
  await resetDatabase(db, opts.demo ? { demo: sealer } : {});
  const app = createApp({ db, config, smtp, log: () => {} });
  const server: Server = await new Promise((resolve) => {
    const s = app.listen(0, '127.0.0.1', () => resolve(s));
  });
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;

  async function call(method: string, path: string, opts: CallOptions = {}): Promise<Reply> {
    const headers: Record<string, string> = { ...(opts.headers ?? {}) };
    if (opts.token) headers.Authorization = `Bearer ${opts.token}`;
    let body: string | Buffer | FormData | undefined;
    if (opts.raw !== undefined) {
      body = opts.raw;
      if (opts.contentType) headers['Content-Type'] = opts.contentType;
    } else if (opts.body !== undefined) {
      body = JSON.stringify(opts.body);
      headers['Content-Type'] = 'application/json';
    }
    const res = await fetch(base + path, { method, headers, body: body as BodyInit | undefined });
    const text = await res.text();
    let json: unknown = undefined;
    try {
      json = text ? JSON.parse(text) : undefined;
    } catch {
      json = undefined;
    }
    const reply = { status: res.status, headers: res.headers, text, json };
    // Every answer is parsed with its route's schema (errors with the shared one): a drift throws here.
    checkAnswer(method, res.redirected ? new URL(res.url).pathname : path, reply, opts.answers ?? answers);
    return reply;
  }

  const tokens = new Map<string, string>();
  async function signIn(email: string, password = DEMO_PASSWORD, deviceId: string | null = randomUUID()) {
    const res = await call('POST', '/api/auth/sign-in', { body: { email, password, ...(deviceId ? { deviceId } : {}) } });
    if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${res.text}`);
    return res.json;
  }
  async function tokenFor(role: keyof typeof emailFor): Promise<string> {
    if (!tokens.has(role)) tokens.set(role, (await signIn(emailFor[role])).accessToken);
    return tokens.get(role)!;
  }
  async function close(): Promise<void> {
    await new Promise<void>((resolve) => server.close(() => resolve()));
    await Promise.all([db.destroy(), smtp.close()]);
  }
  async function mailTo(address: string, count = 1): Promise<CapturedMail[]> {
    const mine = () => smtp.messages.filter((m) => m.to.includes(address.toLowerCase()));
    for (let i = 0; i < 50 && mine().length < count; i++) await new Promise((r) => setTimeout(r, 100));
    return mine();
  }
  async function unfollowed(method: string, path: string, token?: string, body?: unknown): Promise<{ status: number; location: string | null }> {
    const res = await fetch(base + path, {
      method,
      redirect: 'manual',
      headers: { ...(token ? { Authorization: `Bearer ${token}` } : {}), ...(body ? { 'Content-Type': 'application/json' } : {}) },
      ...(body ? { body: JSON.stringify(body) } : {}),
    });
    await res.arrayBuffer();
    return { status: res.status, location: res.headers.get('location') };
  }
  async function reset(): Promise<void> {
    tokens.clear();
    smtp.messages.length = 0;
    await resetDatabase(db, opts.demo ? { demo: sealer } : {});
  }
  return { db, config, sealer, smtp, mailTo, unfollowed, base, call, signIn, tokenFor, reset, close };
}

export async function countRows(db: Db, ...tables: string[]): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const t of tables) out[t] = Number(((await db(t).count({ n: '*' }).first()) as { n: number }).n);
  return out;
}
