/**
 * A server-paged table's state in the query string: its filters, then page, page size, sort and
 * order. Only what differs from the table's defaults is written, so a plain link stays plain and
 * `/completions?result=failed` opens filtered on page 1.
 */
import type { LocationQuery, LocationQueryRaw } from 'vue-router';

export interface TableDefaults {
  pageSize: number;
  /** The page sizes offered. */
  pageSizes?: number[];
  /** Absent: the table has no sorting of its own (the server's order). */
  sort?: string;
  /** Sort columns the server accepts; anything else in the URL falls back to `sort`. */
  sorts?: readonly string[];
}

/** A table's whole query: which parameters are filters, and its paging defaults. */
export interface TableSpec<K extends string> extends TableDefaults {
  filterKeys: readonly K[];
}

export interface Paging {
  page: number;
  pageSize: number;
  sort?: string;
  order?: 'asc' | 'desc';
}

/** One text value of a query parameter; repeated or empty parameters count as absent. */
export function queryText(query: LocationQuery, key: string): string | undefined {
  const v = query[key];
  return typeof v === 'string' && v !== '' ? v : undefined;
}

export function readFilter<K extends string>(query: LocationQuery, keys: readonly K[]): Partial<Record<K, string>> {
  const out: Partial<Record<K, string>> = {};
  for (const k of keys) {
    const v = queryText(query, k);
    if (v !== undefined) out[k] = v;
  }
  return out;
}

const whole = (v: string | undefined, fallback: number, max = Infinity) => {
  const n = Number(v);
  return Number.isInteger(n) && n >= 1 ? Math.min(n, max) : fallback;
};

export function readPaging(query: LocationQuery, d: TableDefaults): Paging {
  const paging: Paging = { page: whole(queryText(query, 'page'), 1), pageSize: whole(queryText(query, 'pageSize'), d.pageSize, 500) };
  if (d.sort === undefined) return paging;
  const s = queryText(query, 'sort');
  paging.sort = s !== undefined && (d.sorts ?? [d.sort]).includes(s) ? s : d.sort;
  paging.order = queryText(query, 'order') === 'asc' ? 'asc' : 'desc';
  return paging;
}

/** The query for a filter and paging: filters first, then only the paging that is not the default. */
export function tableQuery<K extends string>(keys: readonly K[], filter: Partial<Record<K, string | null | undefined>>, paging: Partial<Paging>, d: TableDefaults): LocationQueryRaw {
  const q: Record<string, string> = {};
  for (const k of keys) {
    const v = filter[k];
    if (v !== undefined && v !== null && v !== '') q[k] = String(v);
  }
  if (d.sort !== undefined && paging.sort && paging.sort !== d.sort) q.sort = paging.sort;
  if (d.sort !== undefined && paging.order === 'asc') q.order = 'asc';
  if (paging.page && paging.page > 1) q.page = String(paging.page);
  if (paging.pageSize && paging.pageSize !== d.pageSize) q.pageSize = String(paging.pageSize);
  return q;
}
