import { describe, expect, test } from 'vitest';
import { Name, Notes, Text, textProblem } from './common';

describe('textProblem (T2)', () => {
  test('every C0 control, DEL and C1 control is refused in one-line text (PostgreSQL docs: text cannot hold NUL; Unicode C0/C1 controls)', () => {
    for (let c = 0; c < 0x20; c++) expect(textProblem(`a${String.fromCharCode(c)}b`), `U+${c.toString(16)}`).toMatch(/control character U\+00[01][0-9A-F] at position 2/);
    expect(textProblem('a\u007Fb')).toMatch(/U\+007F/);
    expect(textProblem('a\u0085b')).toMatch(/U\+0085/);
  });

  test('notes keep tab, LF and CR but nothing else below U+0020 (common practice)', () => {
    expect(textProblem('a\tb\r\nc', { lines: true })).toBeNull();
    expect(textProblem('a\u0000', { lines: true })).toMatch(/U\+0000/);
    expect(textProblem('a\u000B', { lines: true })).toMatch(/U\+000B/);
  });

  test('bidi embeddings, overrides, isolates and marks and zero-width characters are refused in names (Unicode TR36 3.2; UAX 9 2.1-2.6)', () => {
    for (const ch of ['\u202A', '\u202B', '\u202C', '\u202D', '\u202E', '\u2066', '\u2067', '\u2068', '\u2069', '\u200E', '\u200F', '\u061C', '\u200B', '\u200C', '\u200D', '\u2060', '\uFEFF']) {
      expect(textProblem(`AH${ch}101`, { names: true }), ch.codePointAt(0)!.toString(16)).toMatch(/invisible or direction-changing character U\+[0-9A-F]{4} at position 3/);
    }
    expect(textProblem('Salle Émile-Zola 3', { names: true })).toBeNull(); // accented letters are fine (control)
  });

  test('the schemas say the field and the position (common practice)', () => {
    expect(Text(20, 'the room').safeParse('1\u202E01').error?.issues[0]?.message).toBe('remove the invisible or direction-changing character U+202E at position 2');
    expect(Name(20, 'the site').safeParse('').error?.issues[0]?.message).toBe('enter the site');
    expect(Notes(20).safeParse('ok\nfine').success).toBe(true);
  });
});
