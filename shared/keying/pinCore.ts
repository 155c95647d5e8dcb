import { readBitting } from './bitting';
import { bitCount, buildUpSeam, controlDepthMask, releasesCore } from './keyOperates';
import { pinChamber } from './pinChamber';
import { stockTable } from './stock';
import { macsBreak, sameProgression } from './rules';
import type { ChamberPinning, CoreKeys, CorePinning, PinningIssue, Profile } from './types';

/**
 * The pinning chart of one core. Never throws for a domain problem: every problem is an
 * issue, and any issue of severity 'error' makes the chart unusable (see hasErrors).
 * When a bitting cannot be read the chart is left empty (`chambers: []`, openings 0)
 * and each unreadable bitting is reported; otherwise every chamber is computed, even
 * with errors, so the Core view can show where the problem is.
 * Cost is O(chambers × keys); the profile is trusted (check it with validateProfile).
 */
export function pinCore(profile: Profile, keys: CoreKeys): CorePinning {
  const issues: PinningIssue[] = [];
  if (keys.operating.length === 0) {
    issues.push({
      code: 'no-operating-keys', severity: 'error',
      message: 'No operating key was given — list the change key and every master that must turn this core.',
    });
    return { chambers: [], openingsCount: 0, controlOpeningsCount: 0, issues };
  }

  const label = (index: number): string => {
    const symbol = keys.symbols?.[index];
    return symbol ? `Key ${symbol}` : `Operating key ${index + 1}`;
  };
  const operating: number[][] = [];
  let unreadable = false;
  for (let index = 0; index < keys.operating.length; index++) {
    const reading = readBitting(profile, keys.operating[index] as string);
    if (reading.ok) {
      operating.push(reading.depths);
    } else {
      unreadable = true;
      issues.push(withKey(reading, label(index), index));
    }
  }
  const controlReading = readBitting(profile, keys.control);
  if (!controlReading.ok) {
    unreadable = true;
    issues.push(withKey(controlReading, 'Control key'));
  }
  const topReading = keys.topMaster === undefined ? undefined : readBitting(profile, keys.topMaster);
  if (topReading && !topReading.ok) {
    unreadable = true;
    issues.push(withKey(topReading, 'Top master'));
  }
  if (unreadable || !controlReading.ok) return { chambers: [], openingsCount: 0, controlOpeningsCount: 0, issues };
  const control = controlReading.depths;
  const topMaster = topReading?.ok ? topReading.depths : (operating[operating.length - 1] as number[]);

  const stock = stockTable(profile);
  const chambers: ChamberPinning[] = [];
  let openingsCount = 1;
  let controlOpeningsCount = 1;
  let controlTurnsPlug = true;
  const extraControl: number[] = [];
  for (let i = 0; i < profile.chambers; i++) {
    const depths = distinctAscending(operating, i);
    const c = control[i] as number;
    if (!depths.includes(c)) controlTurnsPlug = false;
    openingsCount *= depths.length;
    const chamber = pinChamber(stock, i + 1, depths, c, issues);
    chambers.push(chamber);
    const releasing = bitCount(controlDepthMask(chamber, profile));
    controlOpeningsCount *= releasing;
    if (releasing > 1) extraControl.push(i);
  }

  checkKeys(profile, operating, control, chambers, issues, label);
  if (topReading?.ok) checkParity(profile, operating, topMaster, issues, label);
  if (controlOpeningsCount > 1) issues.push(controlOpeningsIssue(profile, chambers, extraControl, controlOpeningsCount));
  if (controlTurnsPlug) {
    issues.push({
      code: 'control-turns-plug', severity: 'error',
      message: 'The control key has an operating depth in every chamber, so it would turn the plug instead of the sleeve — change the control key so that in at least one chamber its cut is none of the operating depths (better: differ from the top master in every chamber).',
    });
  }
  for (let i = 0; i < profile.chambers; i++) {
    if (control[i] === topMaster[i]) {
      issues.push({
        code: 'control-shares-top-master', severity: 'warning', chamber: i + 1,
        message: `Chamber ${i + 1}: the control key has the top master’s depth (${control[i]}) — the usual advice is a control key that differs from the top master in every chamber.`,
      });
    }
  }
  // Errors first so the one that blocks loading is the one shown; otherwise chamber order.
  if (issues.length > 1) issues.sort((a, b) => (a.severity === b.severity ? 0 : a.severity === 'error' ? -1 : 1));
  return { chambers, openingsCount, controlOpeningsCount, issues };
}

/**
 * More bittings than the control key release the core: name each chamber whose
 * two-wafer seam meets the control line, the depth it releases, and the fix (one stocked
 * wafer of the whole build-up, so there is no seam).
 */
function controlOpeningsIssue(profile: Profile, chambers: ChamberPinning[], at: number[], count: number): PinningIssue {
  const parts = at.map((i) => {
    const ch = chambers[i] as ChamberPinning;
    const seam = buildUpSeam(ch, profile);
    const pair = ch.buildUp.join(' + ');
    return seam?.releasesDepth != null
      ? `chamber ${ch.chamber} (build-up ${pair}: its seam meets the control line of depth ${seam.releasesDepth})`
      : `chamber ${ch.chamber}`;
  });
  const sizes = [...new Set(at.map((i) => (chambers[i] as ChamberPinning).buildUp.reduce((a, b) => a + b, 0)))].sort((a, b) => a - b);
  return {
    code: 'control-opens-more', severity: 'warning', chamber: (at[0] as number) + 1,
    message: `The core releases for ${count.toLocaleString('en-US')} bittings, not only the control key: ${joinWords(parts)} — stock ${sizes.length === 1 ? 'a wafer' : 'wafers'} of ${joinWords(sizes.map(String))} units so each build-up is one part, or choose a control cut there closer to the deepest operating cut so one stocked wafer makes the build-up.`,
  };
}

function joinWords(words: readonly string[]): string {
  return words.length <= 1 ? (words[0] ?? '') : `${words.slice(0, -1).join(', ')} and ${words[words.length - 1]}`;
}

/** Checks on whole keys: control selectivity both ways, and the cut limit of each key. */
function checkKeys(
  profile: Profile,
  operating: number[][],
  control: number[],
  chambers: ChamberPinning[],
  issues: PinningIssue[],
  labelOf: (index: number) => string,
): void {
  for (let index = 0; index < operating.length; index++) {
    const depths = operating[index] as number[];
    if (firstIndexOf(operating, depths) < index) continue; // duplicates are harmless; report once
    const label = labelOf(index);
    if (sameDepths(depths, control)) {
      issues.push({
        code: 'control-equals-operating', severity: 'error', key: index,
        message: `${label} is the control key — it would release the core from its housing; take it off the operating list or choose another control key.`,
      });
    } else if (releasesCore(chambers, depths, profile.sleeveUnits)) {
      issues.push({
        code: 'operating-releases-core', severity: 'error', key: index,
        message: `${label} lines up the control shear line in every chamber (the seams of its two-wafer build-ups sit at its cuts), so it would release the core — stock each of those build-ups as one wafer, or choose a control key that, in at least one chamber where it differs from this key, is no deeper than that chamber’s deepest operating cut (one build-up wafer there leaves no seam).`,
      });
    }
    pushMacs(profile, depths, label, issues, index);
  }
  pushMacs(profile, control, 'Control key', issues);
}

/**
 * Against a named top master only: every operating key keeps its parity in every chamber
 * under two-step progression (keying primer). A warning, since the core can still be
 * built (with an odd-sized wafer); entry and progression refuse such keys.
 */
function checkParity(profile: Profile, operating: number[][], top: number[], issues: PinningIssue[], labelOf: (index: number) => string): void {
  if (profile.step < 2) return;
  for (let index = 0; index < operating.length; index++) {
    const depths = operating[index] as number[];
    if (firstIndexOf(operating, depths) < index) continue;
    for (let i = 0; i < profile.chambers; i++) {
      if (sameProgression(profile, depths[i] as number, top[i] as number)) continue;
      issues.push({
        code: 'key-parity', severity: 'warning', chamber: i + 1, key: index,
        message: `${labelOf(index)}, chamber ${i + 1}: cut ${depths[i]} breaks the top master’s parity there; under ${profile.step}-step progression every key keeps it — recut this key.`,
      });
    }
  }
}

function sameDepths(a: readonly number[], b: readonly number[]): boolean {
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return a.length === b.length;
}

function firstIndexOf(keys: readonly number[][], depths: readonly number[]): number {
  for (let i = 0; i < keys.length; i++) if (sameDepths(keys[i] as number[], depths)) return i;
  return -1;
}

function pushMacs(profile: Profile, depths: number[], label: string, issues: PinningIssue[], key?: number): void {
  const i = macsBreak(profile, depths);
  if (i < 0) return;
  const a = depths[i] as number;
  const b = depths[i + 1] as number;
  issues.push({
    code: 'macs-exceeded', severity: 'error', chamber: i + 1, ...(key === undefined ? {} : { key }),
    message: `${label}: cuts ${a} and ${b} in chambers ${i + 1} and ${i + 2} differ by ${Math.abs(a - b)}, more than the ${profile.maxAdjacentCut} this profile allows — the key cannot be cut; change one of those cuts.`,
  });
}

/**
 * Distinct depths at position `i` over all keys, ascending. Depths are single digits, so
 * a bit mask does the de-duplication and the sort without allocating.
 */
function distinctAscending(keys: number[][], i: number): number[] {
  let mask = 0;
  for (const key of keys) mask |= 1 << (key[i] as number);
  const out: number[] = [];
  while (mask !== 0) {
    const low = mask & -mask;
    out.push(31 - Math.clz32(low));
    mask ^= low;
  }
  return out;
}

function withKey(
  reading: { code: PinningIssue['code']; chamber?: number; message: string },
  label: string,
  key?: number,
): PinningIssue {
  return {
    code: reading.code, severity: 'error',
    ...(reading.chamber === undefined ? {} : { chamber: reading.chamber }),
    ...(key === undefined ? {} : { key }),
    // "Control key, chamber 3: ..." rather than "Control key: Chamber 3: ...".
    message: reading.message.startsWith('Chamber ')
      ? `${label}, c${reading.message.slice(1)}`
      : `${label}: ${reading.message.charAt(0).toLowerCase()}${reading.message.slice(1)}`,
  };
}
