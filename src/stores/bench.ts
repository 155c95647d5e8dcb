/**
 * The Bench as the technician sees it: work orders assigned to me (from the server when
 * online), the packets kept on this tablet (from the encrypted offline store), and each
 * core's local progress. Everything the Bench screens show offline comes from here.
 */
import { defineStore } from 'pinia';
import { computed, readonly, ref } from 'vue';
import type { Packet } from '@shared/schemas/packet';
import type { WorkOrder } from '@shared/schemas/records';
import { fetchPacket, listMyWorkOrders } from '@/api/packets';
import { ApiError } from '@/api/http';
import { bench, packets, type BenchProgress, type PacketSummary } from '@/offline';

export type CoreStatus = 'not-started' | 'in-progress' | 'rebuild' | 'finished' | 'set-aside' | 'installed';

/** What the Bench keeps per core, besides the session itself. */
export interface CoreProgress extends BenchProgress {
  status: CoreStatus;
  /** serialise(session) from src/bench/sessionData.ts */
  session?: string;
  completionId?: string;
  installId?: string;
  installedDoor?: string;
}

export const useBenchStore = defineStore('bench', () => {
  const assigned = ref<WorkOrder[]>([]);
  const assignedError = ref<string | null>(null);
  const kept = ref<PacketSummary[]>([]);
  const busy = ref<string | null>(null);

  async function refreshKept(): Promise<void> {
    await packets.purgeExpired();
    kept.value = await packets.list();
  }

  async function refreshAssigned(): Promise<void> {
    try {
      assigned.value = await listMyWorkOrders();
      assignedError.value = null;
    } catch (err) {
      assignedError.value = err instanceof ApiError && err.isNetwork ? null : (err as Error).message;
    }
  }

  async function refresh(): Promise<void> {
    await Promise.all([refreshKept(), refreshAssigned()]);
  }

  /** "Keep on this tablet": download the packet and store it encrypted. */
  async function keep(workOrderId: string): Promise<{ ok: true } | { ok: false; message: string }> {
    busy.value = workOrderId;
    try {
      const packet = await fetchPacket(workOrderId);
      const result = await packets.save(packet);
      if (result.failed.length) return { ok: false, message: result.failed[0]!.message };
      await refreshKept();
      return { ok: true };
    } catch (err) {
      return { ok: false, message: (err as Error).message };
    } finally {
      busy.value = null;
    }
  }

  async function forget(workOrderId: string): Promise<void> {
    await packets.remove(workOrderId);
    await refreshKept();
  }

  const keptIds = computed(() => new Set(kept.value.map((k) => k.workOrderId)));

  return { assigned: readonly(assigned), assignedError: readonly(assignedError), kept: readonly(kept), keptIds, busy: readonly(busy), refresh, refreshKept, keep, forget };
});

export async function loadPacket(workOrderId: string): Promise<Packet | null> {
  return packets.get(workOrderId);
}

export async function progressOf(coreId: string): Promise<CoreProgress | null> {
  return (await bench.getProgress(coreId)) as CoreProgress | null;
}

export async function progressFor(packet: Packet): Promise<Record<string, CoreProgress | null>> {
  const entries = await Promise.all(packet.cores.map(async (c) => [c.id, await progressOf(c.id)] as const));
  return Object.fromEntries(entries);
}
