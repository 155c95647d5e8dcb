// The system audit lists keys in natural order (AA2 before AA10) in its findings and their detail lines:
// the server hands the engine the keys in that order, and the engine lists them in the order given.
import { afterAll, beforeAll, expect, test } from 'vitest';
import { compareSymbols } from '../../shared/keyLevels';
import { startHarness, type Harness } from './harness';

let h: Harness;
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
});
afterAll(async () => h.close());

const naturallySorted = (list: string[]) => list.every((s, i) => i === 0 || compareSymbols(list[i - 1]!, s) <= 0);

test('the demo campus audit lists its keys naturally: AA2 before AA10 (common practice: natural sort order)', async () => {
  const token = await h.tokenFor('supervisor');
  const demoId = (await h.db('key_systems').where({ name: 'Quillon Hill College' }).first('id')).id;
  const res = await h.call('GET', `/api/key-systems/${demoId}/system-audit`, { token });
  expect(res.status).toBe(200);
  const findings = res.json.findings as { code: string; keys?: string[]; details?: string[] }[];
  const apart = findings.find((f) => f.code === 'change-keys-one-apart')!;
  // "AA1 and AA2: chamber 5": the keys of a line, and the first key of each line
  const lines = apart.details!.map((d) => d.split(':')[0]!.replace(/ and \d+ more$/, '').split(/, | and /));
  const firsts = lines.map((l) => l[0]!);
  // The demo holds two-digit symbols, so text order would differ from natural order here.
  expect(firsts.some((s) => /\D\d{2,}$/.test(s))).toBe(true);
  expect([...firsts].sort()).not.toEqual([...firsts].sort(compareSymbols));
  expect(naturallySorted(firsts)).toBe(true);
  for (const l of lines) expect(naturallySorted(l), l.join(', ')).toBe(true);
  for (const f of findings) if (f.keys) expect(naturallySorted(f.keys), f.code).toBe(true);
});
