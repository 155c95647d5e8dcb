import type { Profile } from './types';

const range = (from: number, to: number): number[] =>
  Array.from({ length: to - from + 1 }, (_, i) => from + i);

/*
 * The usual SFIC system: .0125 in steps, depths 0..9, stack 23, sleeve 10 (common
 * practice; see the keying primer). Stocked sizes (the primer's usual kit, common
 * practice): a bottom pin for every depth (0..9); wafers 2..19, since a one-step wafer
 * is too thin to stock (ALOA Keynotes, Sept 2016) and 19 = control 9 + sleeve 10 - depth 0
 * is the largest build-up, so every master wafer and build-up is one part and no seam
 * ever meets the control line; top pins 4..13, the 13 - control the formula needs.
 * A shop with a smaller kit makes a custom profile with its own stock.
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
    wafers: range(2, 19),
    topPins: range(4, 13),
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
