/** The work order a page's route names (`:id`) with its cores (useRouteRecord). */
import { computed } from 'vue';
import type { RouteRecordName } from 'vue-router';
import { getWorkOrder } from '@/api/workOrders';
import { useRouteRecord } from './useRouteRecord';

export function useWorkOrder(page: RouteRecordName) {
  const { record, ...rest } = useRouteRecord(page, getWorkOrder);
  // Writable: a page that saved the work order shows the server's answer without loading again.
  const wo = computed({
    get: () => record.value?.workOrder ?? null,
    set: (w) => {
      if (record.value && w) record.value = { ...record.value, workOrder: w };
    },
  });
  const cores = computed(() => record.value?.cores ?? []);
  return { wo, cores, ...rest };
}
