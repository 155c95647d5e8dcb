/**
 * Server configuration from the environment, with secrets kept in a git-ignored file.
 *
 * Owns `.data/secrets.json`: the token-signing secret and the data key that encrypts
 * bittings at rest. Both are generated on first start unless CW_JWT_SECRET / CW_DATA_KEY
 * (base64, 32 bytes) are set, which is how a production deployment supplies them.
 */
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';

export interface Config {
  env: 'development' | 'test' | 'production';
  port: number;
  host: string;
  databaseUrl: string;
  jwtSecret: Uint8Array;
  dataKey: Buffer;
  accessTokenSeconds: number;
  refreshTokenSeconds: number;
  /** How long a just-rotated refresh secret still gets the same new pair (parallel tabs, retries). */
  refreshGraceSeconds: number;
  /** Express `trust proxy`: which hops may set X-Forwarded-For (req.ip). CW_TRUST_PROXY; default loopback. */
  trustProxy: boolean | number | string;
  /** Failed sign-ins allowed per e-mail and address before a 429. */
  signInAttempts: number;
  signInWindowMs: number;
  /** How often each instance sends owed mail (ms); every instance may, each row under a row lock. */
  owedMailIntervalMs: number;
  publicUrl: string;
  staticDir: string | null;
  smtp: { host: string; port: number } | null;
  mailFrom: string;
}

const root = path.resolve(import.meta.dirname, '..');

function loadSecrets(file: string): { jwtSecret: string; dataKey: string } {
  if (existsSync(file)) return JSON.parse(readFileSync(file, 'utf8')) as { jwtSecret: string; dataKey: string };
  mkdirSync(path.dirname(file), { recursive: true });
  const secrets = { jwtSecret: randomBytes(32).toString('base64'), dataKey: randomBytes(32).toString('base64') };
  writeFileSync(file, JSON.stringify(secrets, null, 2), { mode: 0o600 });
  return secrets;
}

function key32(name: string, base64: string): Buffer {
  const buf = Buffer.from(base64, 'base64');
  if (buf.length !== 32) throw new Error(`${name} must be 32 bytes, base64-encoded (got ${buf.length} bytes)`);
  return buf;
}

/**
 * CW_TRUST_PROXY: `false` (no proxy: req.ip is the socket's peer), a hop count (`1`), or
 * addresses / subnets / Express's names (`loopback`, `10.0.0.0/8, uniquelocal`). The default
 * `loopback` fits one reverse proxy on the same machine: only it may say who the client is.
 */
export function trustProxyOf(value: string | undefined): boolean | number | string {
  const v = (value ?? '').trim();
  if (!v) return 'loopback';
  if (v === 'false' || v === '0') return false;
  if (/^[1-9][0-9]?$/.test(v)) return Number(v);
  if (v === 'true') throw new Error('CW_TRUST_PROXY=true would let any client set its own address; name the proxy (loopback, an address or subnet) or a hop count');
  return v;
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const mode = env.NODE_ENV === 'production' || env.NODE_ENV === 'test' ? env.NODE_ENV : 'development';
  if (!env.DATABASE_URL) throw new Error('DATABASE_URL is not set (npm start and npm test set it for you)');
  const secretsFile = env.CW_SECRETS_FILE ?? path.join(root, '.data', 'secrets.json');
  const needFile = !env.CW_JWT_SECRET || !env.CW_DATA_KEY;
  const fileSecrets = needFile ? loadSecrets(secretsFile) : undefined;
  const port = Number(env.PORT ?? 8080);
  const smtpPort = env.CW_SMTP_PORT ? Number(env.CW_SMTP_PORT) : null;
  return {
    env: mode,
    port,
    host: env.HOST ?? '127.0.0.1',
    databaseUrl: env.DATABASE_URL,
    jwtSecret: key32('CW_JWT_SECRET', env.CW_JWT_SECRET ?? fileSecrets!.jwtSecret),
    dataKey: key32('CW_DATA_KEY', env.CW_DATA_KEY ?? fileSecrets!.dataKey),
    accessTokenSeconds: Number(env.CW_ACCESS_TOKEN_SECONDS ?? 15 * 60),
    refreshTokenSeconds: Number(env.CW_REFRESH_TOKEN_SECONDS ?? 7 * 24 * 3600),
    refreshGraceSeconds: Number(env.CW_REFRESH_GRACE_SECONDS ?? 30),
    trustProxy: trustProxyOf(env.CW_TRUST_PROXY),
    signInAttempts: Number(env.CW_SIGN_IN_ATTEMPTS ?? 5),
    signInWindowMs: Number(env.CW_SIGN_IN_WINDOW_MS ?? 15 * 60 * 1000),
    owedMailIntervalMs: Number(env.CW_OWED_MAIL_INTERVAL_MS ?? 60_000),
    publicUrl: env.CW_PUBLIC_URL ?? `http://127.0.0.1:${port}`,
    staticDir: env.CW_STATIC_DIR === '' ? null : (env.CW_STATIC_DIR ?? path.join(root, 'dist')),
    smtp: smtpPort ? { host: env.CW_SMTP_HOST ?? '127.0.0.1', port: smtpPort } : null,
    mailFrom: env.CW_MAIL_FROM ?? 'Corewright <no-reply@corewright.test>',
  };
}
