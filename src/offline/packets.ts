/**
 * Owns the packets kept on this tablet ("packet:<workOrderId>"), sealed with the packet
 * key. A packet lives until the end of the shift it was fetched for, then it is purged
 * together with the Bench progress of its cores; finished work is in the outbox by then.
 */
import type { Packet } from '@shared/schemas/packet';
import { KEY, commit, readOne, readPrefix } from './db';
import { IntegrityError, reportProblem, resultOf, type WriteResult } from './errors';
import { openRecord, sealRecord, type SealedRecord } from './sealedRecord';
import type { BenchMeta } from './bench';

export interface PacketMeta {
  workOrderId: string;
  expiresAt: string;
}
export interface PacketSummary {
  workOrderId: string;
  title: string;
  number: number;
  fetchedAt: string;
  expiresAt: string;
  coreCount: number;
}

/** An unreadable expiry counts as expired: a packet is never kept longer than meant. */
const expired = (meta: PacketMeta, now: Date) => !(Date.parse(meta.expiresAt) > now.getTime());

function damaged(key: string): null {
  reportProblem({ key, kind: 'damaged', message: new IntegrityError(key).message });
  return null;
}

export async function save(packet: Packet): Promise<WriteResult> {
  const key = KEY.packet(packet.workOrder.id);
  try {
    const stored = await sealRecord<PacketMeta>('packet', key, packet, { workOrderId: packet.workOrder.id, expiresAt: packet.expiresAt });
    await commit([[key, stored]]);
    return resultOf([key]);
  } catch (err) {
    return resultOf([key], err);
  }
}

export async function get(workOrderId: string, now = new Date()): Promise<Packet | null> {
  const key = KEY.packet(workOrderId);
  const stored = await readOne<SealedRecord<PacketMeta>>(key);
  if (!stored) return null;
  if (expired(stored.meta, now)) {
    await remove(workOrderId);
    return null;
  }
  try {
    return await openRecord<Packet>('packet', key, stored);
  } catch (err) {
    if (err instanceof IntegrityError) return damaged(key);
    throw err;
  }
}

export async function list(now = new Date()): Promise<PacketSummary[]> {
  await purgeExpired(now);
  const out: PacketSummary[] = [];
  for (const [key, stored] of await readPrefix<SealedRecord<PacketMeta>>('packet:')) {
    try {
      const p = await openRecord<Packet>('packet', key, stored);
      out.push({ workOrderId: p.workOrder.id, title: p.workOrder.title, number: p.workOrder.number, fetchedAt: p.fetchedAt, expiresAt: p.expiresAt, coreCount: p.cores.length });
    } catch (err) {
      if (err instanceof IntegrityError) damaged(key);
      else throw err;
    }
  }
  return out.sort((a, b) => a.number - b.number);
}

async function benchKeysOf(workOrderIds: Set<string>): Promise<string[]> {
  const bench = await readPrefix<SealedRecord<BenchMeta>>('bench:');
  return bench.filter(([, stored]) => workOrderIds.has(stored.meta?.workOrderId)).map(([key]) => key);
}

/** The packet and the Bench progress of its cores, in one transaction. */
export async function remove(workOrderId: string): Promise<WriteResult> {
  const keys = [KEY.packet(workOrderId), ...(await benchKeysOf(new Set([workOrderId])))];
  try {
    await commit([], keys);
    return resultOf(keys);
  } catch (err) {
    return resultOf(keys, err);
  }
}

/** Works while locked: the expiry is plain metadata. Answers the work order ids removed. */
export async function purgeExpired(now = new Date()): Promise<string[]> {
  const gone = (await readPrefix<SealedRecord<PacketMeta>>('packet:')).filter(([, s]) => expired(s.meta, now)).map(([, s]) => s.meta.workOrderId);
  if (!gone.length) return [];
  const ids = new Set(gone);
  await commit([], [...gone.map(KEY.packet), ...(await benchKeysOf(ids))]);
  return gone;
}
