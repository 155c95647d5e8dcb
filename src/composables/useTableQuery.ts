/**
 * A server-paged table's filters and paging, read from and written to the URL, so a filtered view
 * can be shared, survives a reload, and Back/Forward step through the filters chosen.
 */
import { computed } from 'vue';
import { useRoute, useRouter } from 'vue-router';
import { readFilter, readPaging, tableQuery, type Paging, type TableSpec } from '@/helpers/tableQuery';

export function useTableQuery<K extends string>(spec: TableSpec<K>) {
  const keys = spec.filterKeys;
  const route = useRoute();
  const router = useRouter();
  const filter = computed(() => readFilter(route.query, keys));
  const paging = computed(() => readPaging(route.query, spec));
  const active = computed(() => Object.keys(filter.value).length > 0);

  // A new entry per change (not replace): Back returns to the filters or page seen before.
  const go = (filters: Partial<Record<K, string | null | undefined>>, p: Partial<Paging>) => router.push({ query: tableQuery(keys, filters, p, spec) });

  /** New filters keep the sort and page size and go back to page 1. */
  const setFilter = (next: Partial<Record<K, string | null | undefined>>) => go(next, { ...paging.value, page: 1 });
  const set = (key: K, value: string | null | undefined) => setFilter({ ...filter.value, [key]: value });
  const setPaging = (p: Paging) => go(filter.value, p);

  return { filter, paging, active, set, setFilter, setPaging, clear: () => setFilter({}) };
}
