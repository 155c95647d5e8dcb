/**
 * Owns the outbox ("outbox:<clientId>"): finished work waiting for Sync, sealed with the
 * outbox key. An entry leaves only when the server confirmed it (accepted or duplicate);
 * a refused entry is flagged with the server's message and waits for the technician's
 * retry. Nothing here expires. The plain metadata (when, waiting or flagged) lets the
 * screen count entries while the tablet is locked.
 */
import type { SyncRecord } from '@shared/schemas/sync';
import { KEY, commit, readOne, readPrefix } from './db';
import { IntegrityError, reportProblem, resultOf, type WriteResult } from './errors';
import { openRecord, sealRecord, type SealedRecord } from './sealedRecord';

export interface Flag {
  code: string;
  message: string;
  at: string;
}
export interface OutboxMeta {
  createdAt: string;
  state: 'waiting' | 'flagged';
}
interface OutboxBody {
  record: SyncRecord;
  flag: Flag | null;
}
export interface OutboxEntry {
  clientId: string;
  createdAt: string;
  /** damaged: the ciphertext failed its check; kept, never sent, shown to the technician. */
  state: 'waiting' | 'flagged' | 'damaged';
  flag: Flag | null;
  record: SyncRecord | null;
}
export interface OutboxCount {
  waiting: number;
  flagged: number;
}

type Stored = SealedRecord<OutboxMeta>;
const clientIdOf = (key: string) => key.slice('outbox:'.length);

export async function entry(record: SyncRecord, flag: Flag | null = null, createdAt = new Date().toISOString()): Promise<[string, Stored]> {
  const key = KEY.outbox(record.clientId);
  const body: OutboxBody = { record, flag };
  return [key, await sealRecord<OutboxMeta>('outbox', key, body, { createdAt, state: flag ? 'flagged' : 'waiting' })];
}

async function openEntry(key: string, stored: Stored): Promise<OutboxEntry> {
  const base = { clientId: clientIdOf(key), createdAt: stored.meta.createdAt };
  try {
    const body = await openRecord<OutboxBody>('outbox', key, stored);
    return { ...base, state: body.flag ? 'flagged' : 'waiting', flag: body.flag, record: body.record };
  } catch (err) {
    if (!(err instanceof IntegrityError)) throw err;
    reportProblem({ key, kind: 'damaged', message: err.message });
    const flag = { code: 'damaged', message: `${err.message} It is kept on the tablet and was not sent.`, at: new Date().toISOString() };
    return { ...base, state: 'damaged', flag, record: null };
  }
}

const byAge = (a: OutboxEntry, b: OutboxEntry) => a.createdAt.localeCompare(b.createdAt) || a.clientId.localeCompare(b.clientId);

/** Needs the vault unlocked: entries are opened to show what they are. */
export async function list(): Promise<OutboxEntry[]> {
  const all = await readPrefix<Stored>('outbox:');
  const out: OutboxEntry[] = [];
  for (const [key, stored] of all) out.push(await openEntry(key, stored));
  return out.sort(byAge);
}

/** Works while locked. Every entry waits; flagged ones also need the technician. */
export async function count(): Promise<OutboxCount> {
  const all = await readPrefix<Stored>('outbox:');
  return { waiting: all.length, flagged: all.filter(([, s]) => s.meta?.state === 'flagged').length };
}

export async function flagged(): Promise<OutboxEntry[]> {
  return (await list()).filter((e) => e.state !== 'waiting');
}

/** The entries Sync may send: waiting and readable, oldest first. */
export async function pending(): Promise<{ clientId: string; record: SyncRecord }[]> {
  const all = await readPrefix<Stored>('outbox:');
  const waiting = all.filter(([, s]) => s.meta?.state !== 'flagged');
  const out: OutboxEntry[] = [];
  for (const [key, stored] of waiting) out.push(await openEntry(key, stored));
  return out
    .filter((e) => e.state === 'waiting' && e.record)
    .sort(byAge)
    .map((e) => ({ clientId: e.clientId, record: e.record! }));
}

export async function add(record: SyncRecord): Promise<WriteResult> {
  const key = KEY.outbox(record.clientId);
  try {
    await commit([await entry(record)]);
    return resultOf([key]);
  } catch (err) {
    return resultOf([key], err);
  }
}

/** The server confirmed these: they leave the outbox together. */
export async function confirm(clientIds: string[]): Promise<void> {
  if (clientIds.length) await commit([], clientIds.map(KEY.outbox));
}

async function rewrite(clientIds: string[], flagOf: (clientId: string) => Flag | null): Promise<WriteResult> {
  const puts: [string, Stored][] = [];
  for (const clientId of clientIds) {
    const key = KEY.outbox(clientId);
    const stored = await readOne<Stored>(key);
    if (!stored) continue;
    const current = await openEntry(key, stored);
    if (!current.record) continue;
    puts.push(await entry(current.record, flagOf(clientId), current.createdAt));
  }
  const keys = puts.map(([k]) => k);
  try {
    await commit(puts);
    return resultOf(keys);
  } catch (err) {
    return resultOf(keys, err);
  }
}

export function flag(flags: Map<string, Flag>): Promise<WriteResult> {
  return rewrite([...flags.keys()], (id) => flags.get(id) ?? null);
}

/** The technician asked to send a flagged entry again. */
export function unflag(clientId: string): Promise<WriteResult> {
  return rewrite([clientId], () => null);
}
