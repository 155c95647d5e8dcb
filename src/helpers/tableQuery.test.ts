import { describe, expect, it } from 'vitest';
import { queryText, readFilter, readPaging, tableQuery } from './tableQuery';

const KEYS = ['technicianId', 'result'] as const;
const sorted = { pageSize: 25, sort: 'finishedAt', sorts: ['finishedAt', 'technician'] } as const;
const unsorted = { pageSize: 50 };

describe('a paged table in the query string (common practice)', () => {
  it.each([
    [{ a: 'x' }, 'x'],
    [{ a: '' }, undefined],
    [{ a: ['x', 'y'] }, undefined],
    [{ a: null }, undefined],
    [{}, undefined],
  ])('queryText(%j) is %j: a repeated or empty parameter counts as absent', (q, want) => {
    expect(queryText(q, 'a')).toBe(want);
  });

  it('reads only the filter keys it knows', () => {
    expect(readFilter({ technicianId: 't1', result: '', page: '2', other: 'x' }, KEYS)).toEqual({ technicianId: 't1' });
  });

  it.each([
    [{}, { page: 1, pageSize: 25, sort: 'finishedAt', order: 'desc' }],
    [{ page: '3', pageSize: '10', sort: 'technician', order: 'asc' }, { page: 3, pageSize: 10, sort: 'technician', order: 'asc' }],
    // A sort the server does not accept, a page that is no page: the defaults, never a 400.
    [{ page: '0', pageSize: '-5', sort: 'password', order: 'sideways' }, { page: 1, pageSize: 25, sort: 'finishedAt', order: 'desc' }],
    [{ page: '2.5', pageSize: 'many' }, { page: 1, pageSize: 25, sort: 'finishedAt', order: 'desc' }],
    [{ pageSize: '100000' }, { page: 1, pageSize: 500, sort: 'finishedAt', order: 'desc' }],
  ])('readPaging(%j) with a sortable table', (q, want) => {
    expect(readPaging(q, sorted)).toEqual(want);
  });

  it('a table without sorting reads no sort or order (the server would refuse them)', () => {
    expect(readPaging({ sort: 'technician', order: 'asc', page: '2' }, unsorted)).toEqual({ page: 2, pageSize: 50 });
  });

  it('writes filters and only the paging that differs from the defaults', () => {
    expect(tableQuery(KEYS, { technicianId: 't1', result: null }, { page: 1, pageSize: 25, sort: 'finishedAt', order: 'desc' }, sorted)).toEqual({ technicianId: 't1' });
    expect(tableQuery(KEYS, { result: 'failed' }, { page: 2, pageSize: 10, sort: 'technician', order: 'asc' }, sorted)).toEqual({ result: 'failed', sort: 'technician', order: 'asc', page: '2', pageSize: '10' });
  });

  it('never writes sort or order for a table without sorting', () => {
    expect(tableQuery(KEYS, {}, { page: 2, pageSize: 50, sort: 'x', order: 'asc' }, unsorted)).toEqual({ page: '2' });
  });

  it('drops keys that are not filters, and empty values', () => {
    const filters = { technicianId: '', result: 'passed', injected: 'x' } as Record<string, string>;
    expect(tableQuery(KEYS, filters, {}, sorted)).toEqual({ result: 'passed' });
  });

  it('reading what it wrote gives the same table back', () => {
    const paging = { page: 4, pageSize: 50, sort: 'technician', order: 'asc' } as const;
    const q = tableQuery(KEYS, { technicianId: 't9' }, paging, sorted) as Record<string, string>;
    expect(readFilter(q, KEYS)).toEqual({ technicianId: 't9' });
    expect(readPaging(q, sorted)).toEqual(paging);
  });
});
