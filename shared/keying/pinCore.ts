import { readBitting } from './bitting';
import { chamberKey, freezeChamber, profileCache } from './chamberCache';
import { bitCount, buildUpSeam, controlDepthMask } from './keyOperates';
import { pinChamber } from './pinChamber';
import { sameProgression } from './rules';
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
  // Depths go into one flat scratch table: a row per operating key, then the control key,
  // then the top master; no array per key.
  const n = profile.chambers;
  const count = keys.operating.length;
  const rows = scratchRows((count + 2) * n);
  let unreadable = false;
  for (let index = 0; index < count; index++) {
    const text = keys.operating[index] as string;
    if (!readInto(profile, text, rows, index * n)) {
      unreadable = true;
      issues.push(withKey(failedReading(profile, text), label(index), index));
    }
  }
  const controlRow = count * n;
  if (!readInto(profile, keys.control, rows, controlRow)) {
    unreadable = true;
    issues.push(withKey(failedReading(profile, keys.control), 'Control key'));
  }
  const namedTop = keys.topMaster !== undefined;
  if (namedTop && !readInto(profile, keys.topMaster as string, rows, controlRow + n)) {
    unreadable = true;
    issues.push(withKey(failedReading(profile, keys.topMaster as string), 'Top master'));
  }
  if (unreadable) return { chambers: [], openingsCount: 0, controlOpeningsCount: 0, issues };
  const topRow = namedTop ? controlRow + n : (count - 1) * n;

  const cache = profileCache(profile);
  const chambers: ChamberPinning[] = new Array(n);
  const controlMasks = scratchMasks(n);
  let openingsCount = 1;
  let controlOpeningsCount = 1;
  let controlTurnsPlug = true;
  const extraControl: number[] = [];
  for (let i = 0; i < n; i++) {
    let mask = 0;
    for (let r = i; r < controlRow; r += n) mask |= 1 << (rows[r] as number);
    const c = rows[controlRow + i] as number;
    if (((mask >>> c) & 1) === 0) controlTurnsPlug = false;
    const id = chamberKey(i, mask, c);
    let entry = cache.entries.get(id);
    if (!entry) {
      const own: PinningIssue[] = [];
      const chamber = freezeChamber(pinChamber(cache.stock, i + 1, depthsOf(mask), c, own));
      entry = { chamber, issues: own, controlMask: controlDepthMask(chamber, profile) };
      cache.entries.set(id, entry);
    }
    chambers[i] = entry.chamber;
    for (const issue of entry.issues) issues.push({ ...issue });
    openingsCount *= bitCount(mask);
    const releasing = bitCount(entry.controlMask);
    controlMasks[i] = entry.controlMask;
    controlOpeningsCount *= releasing;
    if (releasing > 1) extraControl.push(i);
  }

  checkKeys(profile, rows, count, controlMasks, issues, label);
  if (namedTop) checkParity(profile, rows, count, topRow, issues, label);
  if (controlOpeningsCount > 1) issues.push(controlOpeningsIssue(profile, chambers, extraControl, controlOpeningsCount));
  if (controlTurnsPlug) {
    issues.push({
      code: 'control-turns-plug', severity: 'error',
      message: 'The control key has an operating depth in every chamber, so it would turn the plug instead of the sleeve — change the control key so that in at least one chamber its cut is none of the operating depths (better: differ from the top master in every chamber).',
    });
  }
  for (let i = 0; i < n; i++) {
    const c = rows[controlRow + i] as number;
    if (c === rows[topRow + i]) {
      issues.push({
        code: 'control-shares-top-master', severity: 'warning', chamber: i + 1,
        message: `Chamber ${i + 1}: the control key has the top master’s depth (${c}) — the usual advice is a control key that differs from the top master in every chamber.`,
      });
    }
  }
  // Errors first so the one that blocks loading is the one shown; otherwise chamber order.
  if (issues.length > 1) issues.sort((a, b) => (a.severity === b.severity ? 0 : a.severity === 'error' ? -1 : 1));
  return { chambers, openingsCount, controlOpeningsCount, issues };
}

/*
 * Scratch tables reused across calls (pinCore runs to the end without yielding, so one
 * call never sees another's rows); they only grow.
 */
let rowScratch = new Int32Array(64);
let maskScratch = new Int32Array(8);
function scratchRows(size: number): Int32Array {
  if (rowScratch.length < size) rowScratch = new Int32Array(Math.max(size, 2 * rowScratch.length));
  return rowScratch;
}
function scratchMasks(size: number): Int32Array {
  if (maskScratch.length < size) maskScratch = new Int32Array(size);
  return maskScratch;
}

/**
 * The depths of a bitting into `rows` from `at`, without allocating; false when it cannot
 * be read (the caller asks readBitting for the message). Accepts exactly what readBitting
 * accepts: one digit per chamber within the profile's depths, surrounding blanks ignored.
 */
function readInto(profile: Profile, text: string, rows: Int32Array, at: number): boolean {
  if (typeof text !== 'string') return false;
  const to = text.length;
  // Trimmed like String.prototype.trim, but only when there may be something to trim.
  if (to > 0 && (text.charCodeAt(0) <= 32 || text.charCodeAt(to - 1) <= 32 || text.charCodeAt(0) > 126 || text.charCodeAt(to - 1) > 126)) {
    const t = text.trim();
    if (t.length !== to) return readInto(profile, t, rows, at);
  }
  return readDigits(profile, text, rows, at);
}

/** readBitting's own words for a bitting readInto refused (the two accept the same texts). */
function failedReading(profile: Profile, text: string): { code: PinningIssue['code']; chamber?: number; message: string } {
  const reading = readBitting(profile, text);
  return reading.ok ? { code: 'bitting-not-digit', message: 'The bitting could not be read.' } : reading;
}

function readDigits(profile: Profile, text: string, rows: Int32Array, at: number): boolean {
  if (text.length !== profile.chambers) return false;
  for (let i = 0; i < profile.chambers; i++) {
    const d = text.charCodeAt(i) - 48;
    if (d < 0 || d > 9 || d < profile.minDepth || d > profile.maxDepth) return false;
    rows[at + i] = d;
  }
  return true;
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
  rows: Int32Array,
  count: number,
  controlMasks: Int32Array,
  issues: PinningIssue[],
  labelOf: (index: number) => string,
): void {
  const n = profile.chambers;
  const controlRow = count * n;
  for (let index = 0; index < count; index++) {
    if (firstSameRow(rows, n, index) < index) continue; // duplicates are harmless; report once
    const at = index * n;
    // The label is written only for an issue: most keys have none.
    if (sameRow(rows, n, at, controlRow)) {
      issues.push({
        code: 'control-equals-operating', severity: 'error', key: index,
        message: `${labelOf(index)} is the control key — it would release the core from its housing; take it off the operating list or choose another control key.`,
      });
    } else if (releases(controlMasks, rows, n, at)) {
      issues.push({
        code: 'operating-releases-core', severity: 'error', key: index,
        message: `${labelOf(index)} lines up the control shear line in every chamber (the seams of its two-wafer build-ups sit at its cuts), so it would release the core — stock each of those build-ups as one wafer, or choose a control key that, in at least one chamber where it differs from this key, is no deeper than that chamber’s deepest operating cut (one build-up wafer there leaves no seam).`,
      });
    }
    const macs = macsChamber(profile, rows, at);
    if (macs >= 0) issues.push(macsIssue(profile, rows, at, macs, labelOf(index), index));
  }
  const macs = macsChamber(profile, rows, controlRow);
  if (macs >= 0) issues.push(macsIssue(profile, rows, controlRow, macs, 'Control key'));
}

/**
 * Against a named top master only: every operating key keeps its parity in every chamber
 * under two-step progression (keying primer). A warning, since the core can still be
 * built (with an odd-sized wafer); entry and progression refuse such keys.
 */
function checkParity(profile: Profile, rows: Int32Array, count: number, topRow: number, issues: PinningIssue[], labelOf: (index: number) => string): void {
  if (profile.step < 2) return;
  const n = profile.chambers;
  for (let index = 0; index < count; index++) {
    if (firstSameRow(rows, n, index) < index) continue;
    for (let i = 0; i < n; i++) {
      const d = rows[index * n + i] as number;
      if (sameProgression(profile, d, rows[topRow + i] as number)) continue;
      issues.push({
        code: 'key-parity', severity: 'warning', chamber: i + 1, key: index,
        message: `${labelOf(index)}, chamber ${i + 1}: cut ${d} breaks the top master’s parity there; under ${profile.step}-step progression every key keeps it — recut this key.`,
      });
    }
  }
}

function sameRow(rows: Int32Array, n: number, a: number, b: number): boolean {
  for (let i = 0; i < n; i++) if (rows[a + i] !== rows[b + i]) return false;
  return true;
}

/** The first operating key (index) cut like key `index`. */
function firstSameRow(rows: Int32Array, n: number, index: number): number {
  for (let j = 0; j < index; j++) if (sameRow(rows, n, j * n, index * n)) return j;
  return index;
}

/** The first chamber (0-based) whose cut and the next differ by more than the profile allows, or -1. */
function macsChamber(profile: Profile, rows: Int32Array, at: number): number {
  for (let i = 0; i + 1 < profile.chambers; i++) {
    if (Math.abs((rows[at + i] as number) - (rows[at + i + 1] as number)) > profile.maxAdjacentCut) return i;
  }
  return -1;
}

function macsIssue(profile: Profile, rows: Int32Array, at: number, i: number, label: string, key?: number): PinningIssue {
  const a = rows[at + i] as number;
  const b = rows[at + i + 1] as number;
  return {
    code: 'macs-exceeded', severity: 'error', chamber: i + 1, ...(key === undefined ? {} : { key }),
    message: `${label}: cuts ${a} and ${b} in chambers ${i + 1} and ${i + 2} differ by ${Math.abs(a - b)}, more than the ${profile.maxAdjacentCut} this profile allows — the key cannot be cut; change one of those cuts.`,
  };
}

/** True when every chamber's control line meets a break at the key's depth there. */
function releases(controlMasks: Int32Array, rows: Int32Array, n: number, at: number): boolean {
  for (let i = 0; i < n; i++) if ((((controlMasks[i] as number) >>> (rows[at + i] as number)) & 1) === 0) return false;
  return true;
}

/** The depths of a bit mask, ascending. */
function depthsOf(mask: number): number[] {
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
