import { z } from 'zod';
import { chamberRange } from '../keying/limits';

export const Id = z.uuid({ error: 'must be a UUID' });
export const IsoDateTime = z.iso.datetime({ offset: true, error: 'must be a date and time like 2026-12-01T09:30:00Z' });
export const IsoDate = z.iso.date({ error: 'must be a date like 2026-12-01' });
/** A bitting as typed: digits, read chamber 1 first. The engine checks length and depths against the profile. */
export const BittingText = z
  .string({ error: 'enter the bitting as digits, chamber 1 first' })
  .trim()
  .regex(new RegExp(`^[0-9]{${chamberRange.min},${chamberRange.max}}$`), { error: `a bitting is ${chamberRange.min} to ${chamberRange.max} digits, chamber 1 first (for example 246802)` });
/**
 * Characters no record holds. Postgres text cannot store U+0000, and the other C0 and C1
 * controls (and DEL) are never typed on purpose; notes may keep tab and line breaks.
 */
const CONTROL = /[\u0000-\u001F\u007F-\u009F]/u;
const CONTROL_BUT_LINES = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F-\u009F]/u;
/**
 * Characters that change how a name looks without being seen (Unicode TR36 3.2, UAX 9):
 * bidi embeddings, overrides, isolates and marks, zero-width spaces and joiners, word joiner
 * and invisible operators, the Mongolian vowel separator and the byte-order mark. A door or
 * key named with them can show as another one.
 */
const INVISIBLE = /[\u061C\u180E\u200B-\u200F\u202A-\u202E\u2060-\u2064\u2066-\u2069\uFEFF]/u;

const codePoint = (ch: string) => `U+${ch.codePointAt(0)!.toString(16).toUpperCase().padStart(4, '0')}`;

/** What is wrong with a piece of text, or null: `lines` allows tab and line breaks (notes), `names` refuses invisible characters. */
export function textProblem(value: string, opts: { lines?: boolean; names?: boolean } = {}): string | null {
  const control = (opts.lines ? CONTROL_BUT_LINES : CONTROL).exec(value);
  if (control) return `remove the control character ${codePoint(control[0])} at position ${control.index + 1}${opts.lines ? '' : ' (this field is one line)'}`;
  const hidden = opts.names ? INVISIBLE.exec(value) : null;
  if (hidden) return `remove the invisible or direction-changing character ${codePoint(hidden[0])} at position ${hidden.index + 1}`;
  return null;
}

/** A zod check that refuses what textProblem() finds, naming the character and where it is. */
export const cleanText = (opts: { lines?: boolean; names?: boolean }) => (value: string, ctx: z.core.$RefinementCtx<string>) => {
  const problem = textProblem(value, opts);
  if (problem) ctx.addIssue({ code: 'custom', message: problem, input: value });
};

/** One line of plain text: a name, title, label, symbol or filter. No controls, nothing invisible. */
export const Text = (max: number, what = 'this field') =>
  z.string({ error: `${what} is text` }).trim().max(max, { error: `${what} has at most ${max} characters` }).superRefine(cleanText({ names: true }));
export const Name = (max: number, what: string) => Text(max, what).min(1, { error: `enter ${what}` });
/** Free text over several lines (notes): tab and line breaks are kept; other controls are refused. */
export const Notes = (max: number, what = 'the notes') =>
  z.string({ error: `${what} is text` }).trim().max(max, { error: `${what} has at most ${max} characters` }).superRefine(cleanText({ lines: true }));

/** The viewer's time zone as Date.getTimezoneOffset() gives it (minutes west of UTC), for whole-day filters. */
export const TzOffset = z.coerce.number().int().min(-840, { error: 'tz is the time-zone offset in minutes, -840 to 840' }).max(840, { error: 'tz is the time-zone offset in minutes, -840 to 840' }).default(0);

export const PageQuery = z.object({
  page: z.coerce.number().int().min(1, { error: 'page starts at 1' }).default(1),
  pageSize: z.coerce.number().int().min(1).max(200, { error: 'pageSize is at most 200' }).default(25),
});
/** The answer of a write that has nothing else to say. */
export const Ok = z.object({ ok: z.boolean() });
export type Ok = z.infer<typeof Ok>;
