import { stringify } from 'csv-stringify/sync';
import { describe, expect, test } from 'vitest';
import { neutraliseCell, safeQuoting } from './csvSafe';

describe('CSV cells for spreadsheets (T10)', () => {
  test('every cell starting with = + - @ tab or CR is prefixed (OWASP CSV Injection)', () => {
    for (const v of ['=1+1', '+1', '-2+3', '@SUM(A1)', '\t=1', '\r=1']) expect(neutraliseCell(v)).toBe(`'${v}`);
    for (const v of ['Hall', '1-2', 42, null]) expect(neutraliseCell(v)).toBe(v);
  });

  test('a cell holding ; or , is quoted, so ";=" never starts a new cell (OWASP CSV Injection; RFC 4180 quoting)', () => {
    const out = stringify([['Aster Hall;=HYPERLINK("x")', 'a,b', 'plain']], safeQuoting);
    expect(out).toBe('"Aster Hall;=HYPERLINK(""x"")","a,b",plain\n');
  });
});
