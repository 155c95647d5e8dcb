import { describe, expect, test } from 'vitest';
import { keyExposure, type ExposureInput } from './keyExposure';
import { keyOperates } from './keyOperates';
import { pinCore } from './pinCore';
import { builtInProfiles } from './profiles';
import type { Profile } from './types';

/*
 * keyExposure on input a record may hold but a chart cannot be made from. The rule is
 * keyOperates' (common practice: a core without a chart is not loaded, so it opens for
 * nothing), checked here against pinCore + keyOperates where a chart exists.
 */
const sfic7 = builtInProfiles['sfic-7'] as Profile;
const control = '4444444';

describe('keyExposure: input without a chart', () => {
  const input: ExposureInput = {
    control,
    keys: [
      { id: 'M', bitting: '6666666' },
      { id: 'C1', bitting: '2222222' },
      { id: 'BAD', bitting: '22x2222' },
    ],
    cores: [
      { id: 'no-keys', operating: [] },
      { id: 'unreadable-key', operating: ['C1', 'BAD'] },
      { id: 'unknown-key', operating: ['C1', 'GONE'] },
      { id: 'fine', operating: ['C1', 'M'] },
    ],
  };

  test('a core with no operating keys, an unreadable or an unknown one exposes nothing, not even to the control key', () => {
    expect(keyExposure(sfic7, input, { bitting: control })).toEqual([{ core: 3, how: 'control' }]);
    expect(keyExposure(sfic7, input, { id: 'C1', bitting: '2222222' })).toEqual([{ core: 3, how: 'intended' }]);
    expect(keyExposure(sfic7, input, { id: 'M', bitting: '6666666' })).toEqual([{ core: 3, how: 'intended' }]);
  });

  test('an unreadable control bitting: no core has a chart, nothing is exposed', () => {
    expect(keyExposure(sfic7, { ...input, control: '44' }, { id: 'C1', bitting: '2222222' })).toEqual([]);
    expect(keyExposure(sfic7, { ...input, control: '444444x' }, { bitting: '4444444' })).toEqual([]);
  });

  test('the one that agrees with pinCore and keyOperates where there is a chart', () => {
    const pinning = pinCore(sfic7, { operating: ['2222222', '6666666'], control });
    expect(keyOperates(pinning, sfic7, '2222222')).toEqual({ plug: true, control: false });
    expect(keyOperates(pinning, sfic7, control)).toEqual({ plug: false, control: true });
  });
});

describe('keyExposure: two keys recorded under one id', () => {
  // The first record of an id is the key, as in the system audit's context; a later record with
  // the same id is not what the cores were pinned for.
  const input: ExposureInput = {
    control,
    keys: [
      { id: 'K', bitting: '2222222' },
      { id: 'K', bitting: '6666666' },
    ],
    cores: [{ id: 'door', operating: ['K'] }],
  };
  test('the first record is the key the core is pinned for', () => {
    expect(keyExposure(sfic7, input, { id: 'K', bitting: '2222222' })).toEqual([{ core: 0, how: 'intended' }]);
    expect(keyExposure(sfic7, input, { bitting: '6666666' })).toEqual([]);
  });
});
