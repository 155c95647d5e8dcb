import type { Profile } from './types';

const range = (from: number, to: number): number[] =>
  Array.from({ length: to - from + 1 }, (_, i) => from + i);

/*
 * The usual SFIC system: .0125 in steps, depths 0..9, stack 23, sleeve 10 (common
 * practice; see the keying primer). Stocked sizes (from memory, common practice for a
 * shop kit): a bottom pin for every depth; wafers 2..10, since a one-step wafer is too
 * thin to stock (ALOA Keynotes, Sept 2016) and a build-up over 10 is made from two;
 * top pins 3..13, covering 13 - control depth for every control depth plus one spare size.
 */
function sfic(chambers: number): Profile {
  return {
    id: `sfic-${chambers}`,
    label: `SFIC ${chambers}-pin, .0125 in steps, stack 23`,
    chambers,
    minDepth: 0,
    maxDepth: 9,
    stackUnits: 23,
    sleeveUnits: 10,
    minWaferUnits: 2,
    step: 2,
    // Published figures disagree; 9 means no limit until the user sets the maker's value.
    maxAdjacentCut: 9,
    bottomPins: range(0, 9),
    wafers: range(2, 10),
    topPins: range(3, 13),
    chamberOneAt: 'back',
  };
}

export const builtInProfiles: Record<string, Profile> = {
  'sfic-6': sfic(6),
  'sfic-7': sfic(7),
};

/**
 * Chambers in the order the Bench loads them, back of the core first (common practice),
 * whichever end the profile numbers as chamber 1.
 */
export function chambersBackToFront(profile: Profile): number[] {
  const numbers = range(1, profile.chambers);
  return profile.chamberOneAt === 'back' ? numbers : numbers.reverse();
}
