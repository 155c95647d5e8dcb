/** Builders for sync records, shaped by shared/schemas/sync.ts, from a real packet. */
import { randomUUID } from 'node:crypto';
import type { Packet, PacketCore } from '../../shared/schemas/packet';
import type { CompletionRecord, InstallRecord } from '../../shared/schemas/sync';
import type { Harness } from './harness';

export function completionFor(workOrderId: string, core: PacketCore, opts: { result?: 'passed' | 'failed'; failFirst?: boolean; at?: Date } = {}): CompletionRecord {
  const start = opts.at ?? new Date(Date.now() - 20 * 60_000);
  const t = (min: number) => new Date(start.getTime() + min * 60_000).toISOString();
  const steps = core.pinning.chambers.flatMap((c, i) => [
    { kind: 'bottom' as const, chamber: c.chamber, size: c.bottom, at: t(i) },
    ...c.masters.map((m) => ({ kind: 'master' as const, chamber: c.chamber, size: m, at: t(i) })),
    ...c.buildUp.map((b) => ({ kind: 'buildUp' as const, chamber: c.chamber, size: b, at: t(i) })),
    { kind: 'top' as const, chamber: c.chamber, size: c.top, at: t(i) },
  ]);
  const checks = (phase: 'before-cap' | 'after-cap', fail = false) =>
    core.keyCheck.map((k, i) => ({ phase, role: k.role, symbol: k.symbol, result: fail && i === 0 ? ('failed' as const) : ('passed' as const), ...(fail && i === 0 ? { note: 'would not turn' } : {}), at: t(10 + i) }));
  const passed = { n: opts.failFirst ? 2 : 1, startedAt: t(0), finishedAt: t(15), result: 'passed' as const, steps, keyChecks: [...checks('before-cap'), ...checks('after-cap')] };
  const failed = { n: 1, startedAt: t(0), finishedAt: t(8), result: 'failed' as const, steps, keyChecks: checks('before-cap', true).slice(0, 1) };
  const result = opts.result ?? 'passed';
  const attempts = result === 'failed' ? [failed] : opts.failFirst ? [failed, passed] : [passed];
  return { clientId: randomUUID(), kind: 'completion', coreId: core.id, workOrderId, startedAt: t(0), finishedAt: t(16), result, attempts };
}

export function installFor(core: PacketCore, opts: { removedCoreTag?: string | null } = {}): InstallRecord {
  return { clientId: randomUUID(), kind: 'install', coreId: core.id, doorId: core.door!.id, removedCoreTag: opts.removedCoreTag ?? null, installedAt: new Date().toISOString() };
}

/**
 * The tablet's records for every core of a work order, as a technician would send them: a passed
 * completion and an install in its planned door naming the core on record there as taken out.
 */
export async function buildAndInstallRecords(h: Harness, token: string, workOrderId: string) {
  const res = await h.call('GET', `/api/work-orders/${workOrderId}/packet`, { token });
  if (res.status !== 200) throw new Error(`packet: ${res.status} ${res.text}`);
  const packet = res.json.packet as Packet;
  const records = [];
  for (const core of packet.cores) {
    const old = await h.db('cores').where({ door_id: core.door!.id, state: 'installed' }).first('tag');
    records.push({ coreId: core.id, doorId: core.door!.id, completion: completionFor(workOrderId, core), install: installFor(core, { removedCoreTag: old?.tag ?? null }) });
  }
  return records;
}

/** The demo technician's first open work order and its packet. */
export async function techPacket(h: Harness, title = 'Aster Hall'): Promise<{ token: string; packet: Packet }> {
  const token = await h.tokenFor('technician');
  const list = await h.call('GET', '/api/work-orders?mine=1', { token });
  const wo = list.json.workOrders.find((w: { title: string }) => w.title.startsWith(title));
  const res = await h.call('GET', `/api/work-orders/${wo.id}/packet`, { token });
  if (res.status !== 200) throw new Error(`packet: ${res.status} ${res.text}`);
  return { token, packet: res.json.packet };
}
