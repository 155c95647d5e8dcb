import { describe, expect, it } from 'vitest';
import { forgotMessage, lockedBecause } from './unlockWords';

describe('the unlock screen says why it is locked (common practice: tell the user what happened)', () => {
  it.each([
    [{ kind: 'idle', minutes: 5 } as const, /after 5 idle minutes/],
    [{ kind: 'idle', minutes: 1 } as const, /after 1 idle minute\./],
    [{ kind: 'signed-in' } as const, /You signed in/],
    [null, /reloaded or restarted/],
  ])('%j', (reason, text) => expect(lockedBecause(reason)).toMatch(text));
});

describe('forgot the passphrase: what goes and what stays, before it happens', () => {
  it('names the wiped work orders, the kept half-built cores and the outbox', () => {
    const text = forgotMessage({ kept: 2, lost: 0, workOrders: 1, packets: 1 }, 3).join('\n');
    expect(text).toMatch(/Wiped now: 1 work order kept/);
    expect(text).toMatch(/Kept: Bench progress on 2 half-built cores/);
    expect(text).toMatch(/its work order/);
    expect(text).toMatch(/3 finished records/);
    expect(text).not.toMatch(/Lost/);
  });
  it('says plainly when older progress cannot be kept', () => {
    const text = forgotMessage({ kept: 0, lost: 1, workOrders: 1, packets: 2 }, 0).join('\n');
    expect(text).toMatch(/Lost: Bench progress on 1 core saved by an older version/);
    expect(text).toMatch(/outbox is empty/);
  });
});
