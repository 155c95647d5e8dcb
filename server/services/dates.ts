import type { Knex } from 'knex';

/**
 * Whole-day filters in the viewer's time zone: `from` and `to` are calendar days as the
 * viewer sees them, `tz` their offset as the browser's Date.getTimezoneOffset() gives it
 * (minutes west of UTC), so "finished today" means today where the supervisor sits.
 */
export function whereDays(db: Knex, q: Knex.QueryBuilder, column: string, f: { from?: string | undefined; to?: string | undefined; tz?: number | undefined }): Knex.QueryBuilder {
  const tz = f.tz ?? 0;
  if (f.from) q.where(column, '>=', db.raw(`(?::date)::timestamp at time zone 'UTC' + ? * interval '1 minute'`, [f.from, tz]));
  if (f.to) q.where(column, '<', db.raw(`((?::date) + 1)::timestamp at time zone 'UTC' + ? * interval '1 minute'`, [f.to, tz]));
  return q;
}

/** A timestamp as the API answers it (ISO 8601 in UTC), or null; JSON would give the same text, the type says so. */
export const isoOrNull = (value: unknown): string | null => (value ? new Date(value as string).toISOString() : null);
