/**
 * The work order a page's route names (`:id`) with its cores, loaded when the id changes while
 * that page is the one shown (leaving for another page with an :id must not load that id here).
 */
import { computed, ref, watch } from 'vue';
import { useRoute, type RouteRecordName } from 'vue-router';
import type { WorkOrder } from '@shared/schemas/records';
import { getWorkOrder, type WorkOrderCore } from '@/api/workOrders';
import { useRequest } from './useRequest';

export function useWorkOrder(page: RouteRecordName) {
  const route = useRoute();
  const id = computed(() => String(route.params.id));
  const wo = ref<WorkOrder | null>(null);
  const cores = ref<WorkOrderCore[]>([]);
  const { busy, error, run, retry } = useRequest({ latestOnly: true });

  async function load(): Promise<void> {
    const res = await run(() => getWorkOrder(id.value));
    if (!res) return;
    wo.value = res.workOrder;
    cores.value = res.cores;
  }
  watch(id, () => (route.name === page ? load() : undefined), { immediate: true });
  return { id, wo, cores, busy, error, retry, load };
}
