import { describe, expect, test } from 'vitest';
import { z } from 'zod';
import { fromZod } from './errors';

describe('fromZod (the 400 shape clients read)', () => {
  const Schema = z.strictObject({ email: z.email({ error: 'enter a valid e-mail address' }), count: z.number() });

  test.each([
    [{ email: 'x', count: 1 }, ['email'], /email: enter a valid e-mail address/],
    [{ email: 'a@b.test', count: 'two' }, ['count'], /count:/],
    [{ email: 'a@b.test', count: 1, role: 'admin' }, [undefined], /remove "role"/],
  ])('%j names %j', (input, fields, summary) => {
    const result = Schema.safeParse(input);
    expect(result.success).toBe(false);
    const err = fromZod(result.error!, 'The form');
    expect(err.status).toBe(400);
    expect(err.details?.map((d) => d.field)).toEqual(fields);
    expect(err.message).toMatch(summary);
  });
});
