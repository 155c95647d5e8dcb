import type { KeyingIssueCode } from './codes';
import type { Profile } from './types';

export interface ProfileProblem {
  code: KeyingIssueCode;
  field: keyof Profile;
  message: string;
}

const isWhole = (n: unknown): n is number => typeof n === 'number' && Number.isInteger(n);

/**
 * Problems that make a profile unusable, in the words an admin editing one would need.
 * An empty list means pinCore can trust the profile; pinCore itself does not re-check.
 */
export function validateProfile(profile: Profile): ProfileProblem[] {
  const problems: ProfileProblem[] = [];
  const add = (code: KeyingIssueCode, field: keyof Profile, message: string): void => {
    problems.push({ code, field, message });
  };

  if (!isWhole(profile.chambers) || profile.chambers < 5 || profile.chambers > 8) {
    add('profile-chambers', 'chambers', `Chambers is ${String(profile.chambers)}; a core has 5 to 8 chambers.`);
  }
  const depthsOk =
    isWhole(profile.minDepth) && isWhole(profile.maxDepth) &&
    profile.minDepth >= 0 && profile.maxDepth <= 9 && profile.minDepth < profile.maxDepth;
  if (!depthsOk) {
    add('profile-depths', 'minDepth',
      `Depths ${String(profile.minDepth)}..${String(profile.maxDepth)}: bittings are one digit per chamber, so depths lie within 0..9, shallowest first.`);
  }
  if (!isWhole(profile.minWaferUnits) || profile.minWaferUnits < 1) {
    add('profile-wafer', 'minWaferUnits', 'The thinnest wafer must be a whole number of units, 1 or more.');
  }
  if (profile.step !== 1 && profile.step !== 2) {
    add('profile-step', 'step', `Step ${String(profile.step)}: use 2 for two-step progression (parity kept per position) or 1.`);
  }
  if (!isWhole(profile.maxAdjacentCut) || profile.maxAdjacentCut < 1) {
    add('profile-macs', 'maxAdjacentCut', 'The maximum adjacent cut must be a whole number, 1 or more; use the depth span for no limit.');
  }
  if (depthsOk) checkStack(profile, add);
  checkStock(profile, 'bottomPins', 'bottom pins', add);
  checkStock(profile, 'wafers', 'wafers', add);
  checkStock(profile, 'topPins', 'top pins', add);
  return problems;
}

function checkStack(
  profile: Profile,
  add: (code: KeyingIssueCode, field: keyof Profile, message: string) => void,
): void {
  const span = profile.maxDepth - profile.minDepth;
  // The control line must clear every operating depth, or build-ups turn negative.
  if (!isWhole(profile.sleeveUnits) || profile.sleeveUnits <= span) {
    add('profile-stack', 'sleeveUnits',
      `Sleeve of ${String(profile.sleeveUnits)} units: it must be more than the depth span (${span}) so the control shear line sits above every operating depth.`);
    return;
  }
  // The deepest control cut still needs a top pin above the control line.
  const needed = profile.maxDepth + profile.sleeveUnits + 1;
  if (!isWhole(profile.stackUnits) || profile.stackUnits < needed) {
    add('profile-stack', 'stackUnits',
      `Stack of ${String(profile.stackUnits)} units: with depth ${profile.maxDepth} and a ${profile.sleeveUnits}-unit sleeve it must be at least ${needed} to leave room for a top pin.`);
  }
}

function checkStock(
  profile: Profile,
  field: 'bottomPins' | 'wafers' | 'topPins',
  words: string,
  add: (code: KeyingIssueCode, field: keyof Profile, message: string) => void,
): void {
  const sizes = profile[field];
  if (!Array.isArray(sizes) || sizes.length === 0) {
    add('profile-stock', field, `No ${words} are stocked; list the sizes the kit holds.`);
  } else if (!sizes.every((s) => isWhole(s) && s >= 0)) {
    add('profile-stock', field, `Stocked ${words} must be whole numbers of units, 0 or more.`);
  }
}
