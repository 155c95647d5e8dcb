import type { KeyingIssueCode } from './codes';
import { adjacentCutRange, chamberRange, depthRange, isWhole, partSizeRange, sleeveRange, stackRange, stepRange, stockedSizesRange, waferRange, within } from './limits';
import type { Profile } from './types';

export interface ProfileProblem {
  code: KeyingIssueCode;
  field: keyof Profile;
  message: string;
}

/**
 * Problems that make a profile unusable, in the words an admin editing one would need.
 * An empty list means pinCore can trust the profile; pinCore itself does not re-check.
 * Every limit comes from limits.ts; the API's zod `Profile` is refined by this function, so
 * the two cannot disagree (shared/schemas/profiles.test.ts checks both at every edge).
 */
export function validateProfile(profile: Profile): ProfileProblem[] {
  const problems: ProfileProblem[] = [];
  const add = (code: KeyingIssueCode, field: keyof Profile, message: string): void => {
    problems.push({ code, field, message });
  };

  if (!within(profile.chambers, chamberRange)) {
    add('profile-chambers', 'chambers', `Chambers is ${String(profile.chambers)}; a core has ${chamberRange.min} to ${chamberRange.max} chambers.`);
  }
  const depthsOk = within(profile.minDepth, depthRange) && within(profile.maxDepth, depthRange) && profile.minDepth < profile.maxDepth;
  if (!depthsOk) {
    add('profile-depths', 'minDepth',
      `Depths ${String(profile.minDepth)}..${String(profile.maxDepth)}: bittings are one digit per chamber, so depths lie within ${depthRange.min}..${depthRange.max}, shallowest first.`);
  }
  if (!isWhole(profile.minWaferUnits) || profile.minWaferUnits < waferRange.min) {
    add('profile-wafer', 'minWaferUnits', `The thinnest wafer must be a whole number of units, ${waferRange.min} or more.`);
  } else if (profile.minWaferUnits > waferRange.max) {
    add('profile-wafer', 'minWaferUnits', `A thinnest wafer of ${profile.minWaferUnits} units is more than a kit holds; use ${waferRange.min} to ${waferRange.max}.`);
  }
  if (!within(profile.step, stepRange)) {
    add('profile-step', 'step', `Step ${String(profile.step)}: use 2 for two-step progression (parity kept per position) or 1.`);
  }
  if (!isWhole(profile.maxAdjacentCut) || profile.maxAdjacentCut < adjacentCutRange.min) {
    add('profile-macs', 'maxAdjacentCut', `The maximum adjacent cut must be a whole number, ${adjacentCutRange.min} or more; use the depth span for no limit.`);
  } else if (profile.maxAdjacentCut > adjacentCutRange.max) {
    add('profile-macs', 'maxAdjacentCut', `A maximum adjacent cut of ${profile.maxAdjacentCut} is past any depth span; use the depth span (at most ${adjacentCutRange.max}) for no limit.`);
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
  if (!within(profile.sleeveUnits, sleeveRange)) {
    add('profile-stack', 'sleeveUnits', `Sleeve of ${profile.sleeveUnits} units: a sleeve is ${sleeveRange.min} to ${sleeveRange.max} units.`);
    return;
  }
  // The deepest control cut still needs a top pin above the control line.
  const needed = profile.maxDepth + profile.sleeveUnits + 1;
  if (!isWhole(profile.stackUnits) || profile.stackUnits < needed) {
    add('profile-stack', 'stackUnits',
      `Stack of ${String(profile.stackUnits)} units: with depth ${profile.maxDepth} and a ${profile.sleeveUnits}-unit sleeve it must be at least ${needed} to leave room for a top pin.`);
  } else if (!within(profile.stackUnits, stackRange)) {
    add('profile-stack', 'stackUnits', `Stack of ${profile.stackUnits} units: a stack is ${stackRange.min} to ${stackRange.max} units.`);
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
  } else if (!sizes.every((s) => isWhole(s) && s >= partSizeRange.min)) {
    add('profile-stock', field, `Stocked ${words} must be whole numbers of units, ${partSizeRange.min} or more.`);
  } else if (!sizes.every((s) => s <= partSizeRange.max)) {
    add('profile-stock', field, `Stocked ${words} of more than ${partSizeRange.max} units do not fit a chamber; list sizes ${partSizeRange.min} to ${partSizeRange.max}.`);
  } else if (sizes.length > stockedSizesRange.max) {
    add('profile-stock', field, `${sizes.length} sizes of ${words} listed; a kit lists at most ${stockedSizesRange.max}.`);
  }
}
