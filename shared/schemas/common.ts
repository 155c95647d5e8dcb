import { z } from 'zod';

export const Id = z.uuid({ error: 'must be a UUID' });
export const IsoDateTime = z.iso.datetime({ offset: true, error: 'must be a date and time like 2026-12-01T09:30:00Z' });
export const IsoDate = z.iso.date({ error: 'must be a date like 2026-12-01' });
/** A bitting as typed: digits, read chamber 1 first. The engine checks length and depths against the profile. */
export const BittingText = z
  .string({ error: 'enter the bitting as digits, chamber 1 first' })
  .trim()
  .regex(/^[0-9]{5,8}$/, { error: 'a bitting is 5 to 8 digits, chamber 1 first (for example 246802)' });
export const Text = (max: number, what = 'this field') => z.string().trim().max(max, { error: `${what} has at most ${max} characters` });
export const Name = (max: number, what: string) => Text(max, what).min(1, { error: `enter ${what}` });

/** The viewer's time zone as Date.getTimezoneOffset() gives it (minutes west of UTC), for whole-day filters. */
export const TzOffset = z.coerce.number().int().min(-840, { error: 'tz is the time-zone offset in minutes, -840 to 840' }).max(840, { error: 'tz is the time-zone offset in minutes, -840 to 840' }).default(0);

export const PageQuery = z.object({
  page: z.coerce.number().int().min(1, { error: 'page starts at 1' }).default(1),
  pageSize: z.coerce.number().int().min(1).max(200, { error: 'pageSize is at most 200' }).default(25),
});
