/** Loads one kept packet and its cores' Bench progress from the tablet, for the Bench pages. */
import { ref, shallowRef, watch, type Ref } from 'vue';
import type { Packet } from '@shared/schemas/packet';
import { loadPacket, progressFor, type CoreProgress } from '@/stores/bench';

export function usePacket(workOrderId: Ref<string>) {
  // Shallow: a packet is read, never changed in place, and deep proxies over every chart slow each Bench step.
  const packet = shallowRef<Packet | null>(null);
  const progress = shallowRef<Record<string, CoreProgress | null>>({});
  const loading = ref(true);
  const missing = ref(false);

  async function reload(): Promise<void> {
    loading.value = true;
    const p = await loadPacket(workOrderId.value);
    packet.value = p;
    missing.value = !p;
    progress.value = p ? await progressFor(p) : {};
    loading.value = false;
  }

  watch(workOrderId, () => void reload(), { immediate: true });
  return { packet, progress, loading, missing, reload };
}
