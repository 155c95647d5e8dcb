/**
 * The record a page's route names (`:id`), loaded when the id changes while that page is the one
 * shown (leaving for another page with an :id must not load that id here), with the request's busy
 * flag, error in words and retry. `fetch` may load several things at once (a tuple from Promise.all).
 */
import { computed, ref, watch, type Ref } from 'vue';
import { useRoute, type RouteRecordName } from 'vue-router';
import { useRequest } from './useRequest';

export function useRouteRecord<T>(page: RouteRecordName, fetch: (id: string) => Promise<T>) {
  const route = useRoute();
  const id = computed(() => String(route.params.id));
  const record = ref<T | null>(null) as Ref<T | null>;
  const { busy, error, run, retry } = useRequest({ latestOnly: true, busy: true });

  async function load(): Promise<void> {
    const value = await run(() => fetch(id.value));
    if (value !== undefined) record.value = value;
  }
  watch(id, () => (route.name === page ? load() : undefined), { immediate: true });
  return { id, record, busy, error, retry, load };
}
