import { describe, expect, test } from 'vitest';
import { pinCore, type Profile } from '@shared/keying';
import { benchBlocker, chamberOneWords, loadingOrder, loadingSteps, partName, stepNotes } from './steps';
import { kit6, mixedKeys, primerKeys, sfic6 } from './testing/fixtures';

describe('loadingSteps', () => {
  // keying-primer worked example: change 2, master 6, control 4 gives bottom 2, master
  // wafer 4, build-up 8, top 9; total 23.
  test('the primer worked example, from the key up', () => {
    const steps = loadingSteps(pinCore(sfic6, primerKeys), sfic6);
    const one = steps.filter((s) => s.chamber === 1);
    expect(one.map((s) => [s.kind, s.size, s.partLabel, s.stackHeightAfter])).toEqual([
      ['bottom', 2, 'Bottom pin', 2],
      ['master', 4, 'Master wafer', 6],
      ['buildUp', 8, 'Build-up wafer', 14],
      ['top', 9, 'Top pin', 23],
    ]);
    expect(one.map((s) => s.indexInChamber)).toEqual([0, 1, 2, 3]);
  });

  // keying-primer bench procedure: load each chamber fully before the next, back to
  // front, then look across the stacks (level check); springs go in after.
  test('chambers in loading order, then the level check and the springs', () => {
    const steps = loadingSteps(pinCore(sfic6, mixedKeys), sfic6);
    const chambers = steps.map((s) => s.chamber).filter((c) => c !== null);
    expect([...new Set(chambers)]).toEqual([1, 2, 3, 4, 5, 6]);
    // Each chamber's steps are contiguous: the sequence never returns to a chamber.
    expect(chambers.every((c, i) => i === 0 || c >= (chambers[i - 1] as number))).toBe(true);
    expect(steps.slice(-2).map((s) => s.kind)).toEqual(['level-check', 'springs']);
    expect(steps.some((s) => s.kind === 'cap')).toBe(false);
    expect(new Set(steps.map((s) => s.id)).size).toBe(steps.length);
  });

  // keying-primer stack total: every chamber sums to H (23 for the usual profile).
  test('the stack height reaches the stack total at the end of every chamber', () => {
    const steps = loadingSteps(pinCore(sfic6, mixedKeys), sfic6);
    for (let c = 1; c <= 6; c++) {
      const mine = steps.filter((s) => s.chamber === c);
      expect(mine.at(-1)?.kind).toBe('top');
      expect(mine.at(-1)?.stackHeightAfter).toBe(23);
      const heights = mine.map((s) => s.stackHeightAfter as number);
      expect(heights).toEqual([...heights].sort((a, b) => a - b));
    }
  });

  // keying-primer stocked sizes: a build-up over the largest wafer is two wafers, lower first.
  test('a two-wafer build-up is two steps, lower wafer first', () => {
    const steps = loadingSteps(pinCore(kit6, mixedKeys), kit6);
    const three = steps.filter((s) => s.chamber === 3);
    expect(three.map((s) => [s.kind, s.size])).toEqual([['bottom', 4], ['buildUp', 9], ['buildUp', 6], ['top', 4]]);
    expect(three.filter((s) => s.kind === 'buildUp').map(partName)).toEqual(['Build-up wafer 1 of 2', 'Build-up wafer 2 of 2']);
  });

  // Common SFIC numbering (keying primer): back to front; chambersBackToFront in shared/keying.
  test('a profile numbered from the front loads its highest chamber first and says so', () => {
    const front: Profile = { ...sfic6, chamberOneAt: 'front' };
    expect(loadingOrder(front)).toEqual([6, 5, 4, 3, 2, 1]);
    expect(loadingSteps(pinCore(front, mixedKeys), front)[0]?.chamber).toBe(6);
    expect(chamberOneWords(front)).toBe('chamber 1 is at the front of the core');
    expect(chamberOneWords(sfic6)).toBe('chamber 1 is at the back of the core');
  });

  // shared/keying README: a chart with an error is unusable; the Bench refuses it.
  test('a chart with errors is refused with a reason', () => {
    const broken = pinCore(sfic6, { operating: ['12'], control: '444444' });
    expect(benchBlocker(broken, sfic6)).toMatch(/error/);
    expect(() => loadingSteps(broken, sfic6)).toThrow(/error/);
  });
});

describe('stepNotes', () => {
  // the issue: a #0 bottom pin never reads "Stack after this part: 0 units"; a two-wafer build-up says which wafer first
  test('a size-0 part says it adds no height instead of "0 units"', () => {
    const plan = loadingSteps(pinCore(sfic6, mixedKeys), sfic6);
    const zero = { ...plan.find((s) => s.kind === 'bottom')!, size: 0, stackHeightAfter: 0 };
    const notes = stepNotes(zero, plan);
    expect(notes.join(' ')).not.toMatch(/0 units/);
    expect(notes[0]).toMatch(/size-0 bottom pin adds no height/);
  });

  test('a two-wafer build-up names the wafer to stack first, by size (common practice: the larger, lower wafer first)', () => {
    const plan = loadingSteps(pinCore(kit6, mixedKeys), kit6);
    const first = plan.find((s) => s.kind === 'buildUp' && s.ofKind?.of === 2)!;
    const pair = plan.filter((s) => s.chamber === first.chamber && s.kind === 'buildUp');
    expect(stepNotes(first, plan)).toContain(`Two wafers make this build-up: stack the ${pair[0]!.size} first, then the ${pair[1]!.size} on top.`);
    expect(stepNotes(first, plan)[0]).toBe(`Stack after this part: ${first.stackHeightAfter} units`);
  });
});
