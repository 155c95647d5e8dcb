/**
 * Test-only cores built with the real engine. Bittings are our own inventions for tests;
 * none belongs to a real system.
 */
import { builtInProfiles, pinCore, type CoreKeys, type Profile } from '@shared/keying';
import type { KeyCheckItem, PacketCore } from '@shared/schemas/packet';

export const sfic6 = builtInProfiles['sfic-6'] as Profile;
/** A shop kit of wafers 2..10 (a custom profile): build-ups over 10 are two wafers. */
export const kit6: Profile = { ...sfic6, id: 'sfic-6-kit10', label: 'SFIC 6-pin, wafers 2-10', wafers: [2, 3, 4, 5, 6, 7, 8, 9, 10] };

/** The keying primer's worked example in every chamber: change 2, master 6, control 4. */
export const primerKeys: CoreKeys = { operating: ['222222', '666666'], control: '444444' };
/** Mixed chambers: some mastered, some not; with kit6, three with a two-wafer build-up. */
export const mixedKeys: CoreKeys = { operating: ['024682', '264680'], control: '539157' };

/** Deliberately out of checking order, to show the Bench sorts it. */
export const plan: KeyCheckItem[] = [
  { role: 'must-not-turn', symbol: 'AB3', level: 'change', expect: 'none' },
  { role: 'control', symbol: 'CONTROL', level: null, expect: 'releases' },
  { role: 'master', symbol: 'A', level: 'gm', expect: 'turns' },
  { role: 'master', symbol: 'AA', level: 'master', expect: 'turns' },
  { role: 'change', symbol: 'AA1', level: 'change', expect: 'turns' },
];

export function packetCore(keys: CoreKeys = mixedKeys, profile: Profile = sfic6): PacketCore {
  return {
    id: '0b7c8a4e-6f1d-4c1e-9a2b-3c4d5e6f7a80',
    tag: 'T-0001',
    state: 'planned',
    door: null,
    pinning: pinCore(profile, keys),
    keyCheck: plan,
  };
}

/** A clock that moves one second per call, so every recorded time is distinct. */
export function clock(start = Date.parse('2026-12-01T09:00:00Z')): () => Date {
  let t = start;
  return () => new Date((t += 1000));
}
