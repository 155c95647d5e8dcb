import { describe, expect, test } from 'vitest';
import { pinCore } from '@shared/keying';
import { LABEL_FONT, NOW_FONT, TIP, UNIT, coreDrawing, labelY } from './coreDrawing';
import { next, startSession } from './session';
import { partStatus } from './sessionView';
import { loadingSteps } from './steps';
import { clock, mixedKeys, packetCore, primerKeys, sfic6 } from './testing/fixtures';

describe('Core view geometry', () => {
  // keying-primer worked example: bottom 2, master wafer 4, build-up 8, top 9 (23 units).
  test('part heights are proportional to units and stack without gaps from the key up', () => {
    const d = coreDrawing(loadingSteps(pinCore(sfic6, primerKeys), sfic6), sfic6);
    const one = d.parts.filter((p) => p.chamber === 1);
    expect(one.map((p) => p.h / UNIT)).toEqual([2, 4, 8, 9]);
    expect(one[0]!.y + one[0]!.h).toBe(d.baseY);
    for (let i = 1; i < one.length; i++) expect(one[i]!.y + one[i]!.h).toBe(one[i - 1]!.y);
    expect(one.map((p) => p.short)).toEqual(['B', 'M1', 'BU', 'T']);
  });

  // keying-primer: the control shear line sits one sleeve (10 units) above the operating one.
  test('the control line is a sleeve above the operating line; both span every chamber', () => {
    const d = coreDrawing(loadingSteps(pinCore(sfic6, mixedKeys), sfic6), sfic6);
    expect((d.lines.operatingY - d.lines.controlY) / UNIT).toBe(sfic6.sleeveUnits);
    const last = d.chambers.at(-1)!;
    expect(d.lines.x1).toBeLessThan(d.chambers[0]!.x);
    expect(d.lines.x2).toBeGreaterThan(last.x + 60);
    expect(d.ends).toEqual({ left: 'Back', right: 'Front' });
  });

  test('status follows the session, and the summary names only the current part', () => {
    const now = clock();
    let s = startSession(packetCore(primerKeys), sfic6, now());
    s = next(next(s, now()), now());
    const d = coreDrawing(s.plan, sfic6, partStatus(s));
    expect(d.parts.slice(0, 3).map((p) => p.status)).toEqual(['done', 'done', 'current']);
    expect(d.parts.at(-1)?.status).toBe('pending');
    expect(d.chambers[0]?.spring.status).toBe('pending');
    expect(d.summary).toBe('Core view: 6 chambers, chamber 1 at the back. 2 of 24 parts in. Now: chamber 1, build-up wafer, size 8. Springs not in yet. Not capped yet.');
  });
});

describe('Core view labels', () => {
  // Our own legibility rule: no shear line runs through a part's digits (12 px glyphs).
  test('a label moves off a line that would cross it, and stays centred otherwise', () => {
    expect(labelY(100, 60, [])).toBe(137.5);
    expect(labelY(100, 60, [130])).toBe(150);
    expect(labelY(100, 50, [126])).toBe(146);
    expect(labelY(100, 40, [124])).toBe(119);
    expect(labelY(100, 40, [132])).toBe(127.5);
    const d = coreDrawing(loadingSteps(pinCore(sfic6, mixedKeys), sfic6), sfic6);
    for (const p of d.parts.filter((x) => x.h + x.tip >= 24)) {
      for (const line of [d.lines.operatingY, d.lines.controlY]) expect(line < p.labelY - 15 - 1 || line > p.labelY + 1).toBe(true);
    }
  });

  // the issue: a #0 bottom pin is a real part and must be seen, labelled, and pointed at
  test('a size-0 bottom pin has a visible body (its tip) with room for its label', () => {
    const plan = loadingSteps(pinCore(sfic6, primerKeys), sfic6).map((s) => (s.id === 'c1-0-bottom' ? { ...s, size: 0 } : s));
    const d = coreDrawing(plan, sfic6);
    const zero = d.parts.find((p) => p.id === 'c1-0-bottom')!;
    expect(zero.h).toBe(0);
    expect(zero.h + zero.tip).toBeGreaterThanOrEqual(24);
    expect(zero.y + zero.h + zero.tip).toBe(d.floorY);
    // every bottom pin has the same tip, so stack heights still compare by units
    expect(new Set(d.parts.filter((p) => p.kind === 'bottom').map((p) => p.tip))).toEqual(new Set([TIP]));
  });

  test('the drawing is narrow enough that labels stay 12 px at a 1280x800 tablet (about 440 px wide there)', () => {
    // measured: the Core view column is about 440 px wide at 1280x800 landscape with the menu shown
    const d = coreDrawing(loadingSteps(pinCore(sfic6, mixedKeys), sfic6), { ...sfic6, chambers: 7 });
    expect((LABEL_FONT * 440) / d.width).toBeGreaterThanOrEqual(12);
  });
});

describe('Core view "now" pointer', () => {
  // the issue: the pointer ran into the next chamber. Our own rule: it stays in the gap beside the current part.
  test('the pointer sits in the gap beside the current part, clear of the next chamber and of the shear-line words, in every chamber', () => {
    const plan = loadingSteps(pinCore(sfic6, mixedKeys), sfic6);
    for (const current of plan.filter((s) => s.chamber !== null)) {
      const status = Object.fromEntries(plan.map((s) => [s.id, s.id === current.id ? 'current' : 'pending'] as const));
      const d = coreDrawing(plan, sfic6, status);
      const part = d.parts.find((p) => p.id === current.id)!;
      const { box } = d.pointer!;
      expect(box.x, current.id).toBeGreaterThan(part.x + part.w);
      const next = d.chambers.find((c) => c.chamber === part.chamber + 1);
      // the next chamber's parts start at its x; after the last chamber the shear-line words start at x2 + 6
      const limit = next ? next.x : d.lines.x2 + 6;
      expect(box.x + box.w, current.id).toBeLessThan(limit);
      expect(box.y + box.h / 2).toBe(part.y + (part.h + part.tip) / 2);
      // "now" (three glyphs at most 0.6 em wide each, from memory of Roboto's metrics) fits over its own chamber,
      // under the chamber number (baseline 26) and above the cap
      const chamber = d.chambers.find((c) => c.chamber === part.chamber)!;
      expect(d.pointer!.word.x).toBe(chamber.cx);
      expect(3 * 0.6 * NOW_FONT).toBeLessThan(part.w);
      expect(d.pointer!.word.y - NOW_FONT * 0.55).toBeGreaterThan(26);
      expect(d.pointer!.word.y).toBeLessThan(chamber.cap.y);
    }
  });

  test('no pointer when no part is current (springs, cap, a finished core)', () => {
    expect(coreDrawing(loadingSteps(pinCore(sfic6, primerKeys), sfic6), sfic6).pointer).toBeNull();
  });
});
