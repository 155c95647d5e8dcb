import { readBitting, parseBitting } from './bitting';
import { chamberKey, profileCache, type ProfileCache } from './chamberCache';
import { controlDepthMask, hasBreakAt } from './keyOperates';
import { pinChamber } from './pinChamber';
import type { PinningIssue, Profile } from './types';

/*
 * What one key exposes in a set of cores as they are pinned: the cores whose plug it turns
 * (intended when it is one of the core's operating keys, incidental otherwise: it lines up
 * every chamber only through master wafers) and the cores it removes (it lines up the control
 * shear line: the control key does so in every core). The same answer as keyOperates on
 * pinCore's chart of each core (keyExposure.test.ts proves it by brute force and fast-check),
 * only faster: a chamber's stack depends only on (chamber, operating depths, control depth),
 * so each distinct stack is pinned once, through pinChamber, and read as two bit masks.
 */

export interface ExposureKey {
  id: string;
  bitting: string;
}

export interface ExposureCore {
  id: string;
  /** Ids of the keys the core is pinned for (change key, masters above it, cross keys). */
  operating: readonly string[];
}

export interface ExposureInput {
  keys: readonly ExposureKey[];
  cores: readonly ExposureCore[];
  control: string;
}

export type ExposureHow = 'intended' | 'incidental' | 'control';

export interface CoreExposure {
  /** Index into `input.cores`. */
  core: number;
  how: ExposureHow;
}

/** Per profile cache: packed masks of a chamber, plug depths in bits 0..9, control depths in bits 10..19. */
const masks = new WeakMap<ProfileCache, Map<number, number>>();

function depthsOf(mask: number): number[] {
  const out: number[] = [];
  for (let d = 0; d < 10; d++) if ((mask >>> d) & 1) out.push(d);
  return out;
}

/** The plug and control masks of the chamber pinCore would build for these depths. */
function chamberMasks(profile: Profile, cache: ProfileCache, own: Map<number, number>, chamber: number, depthMask: number, control: number): number {
  const id = chamberKey(chamber, depthMask, control);
  const known = own.get(id);
  if (known !== undefined) return known;
  const stack = cache.entries.get(id)?.chamber ?? pinChamber(cache.stock, chamber + 1, depthsOf(depthMask), control, [] as PinningIssue[]);
  let plug = 0;
  for (let d = profile.minDepth; d <= profile.maxDepth; d++) if (hasBreakAt(stack, d)) plug |= 1 << d;
  const packed = plug | (controlDepthMask(stack, profile) << 10);
  own.set(id, packed);
  return packed;
}

/**
 * The cores `key` turns or removes, in core order. `key.id` names it among the keys (so a
 * core pinned for it is intended); leave it out for a key that is no operating key of any
 * core (the control key). A core whose keys cannot all be read has no chart and exposes
 * nothing, as keyOperates on such a pinning. Throws KeyingError when `key.bitting` cannot be
 * read, as keyOperates does.
 */
export function keyExposure(profile: Profile, input: ExposureInput, key: { id?: string; bitting: string }): CoreExposure[] {
  const depths = parseBitting(profile, key.bitting);
  const controlReading = readBitting(profile, input.control);
  if (!controlReading.ok) return [];
  const control = controlReading.depths;
  const n = profile.chambers;
  const index = new Map<string, number>();
  const table = new Int8Array(input.keys.length * n);
  input.keys.forEach((k, i) => {
    if (!index.has(k.id)) index.set(k.id, i);
    const r = readBitting(profile, k.bitting);
    if (r.ok) r.depths.forEach((d, c) => { table[i * n + c] = d; });
    else table[i * n] = -1;
  });
  const cache = profileCache(profile);
  let own = masks.get(cache);
  if (!own) masks.set(cache, (own = new Map()));
  const out: CoreExposure[] = [];
  const rows: number[] = [];
  for (let c = 0; c < input.cores.length; c++) {
    const core = input.cores[c] as ExposureCore;
    rows.length = 0;
    let readable = core.operating.length > 0;
    let intended = false;
    for (const id of core.operating) {
      const k = index.get(id);
      if (k === undefined || (table[k * n] as number) < 0) { readable = false; break; }
      if (id === key.id) intended = true;
      rows.push(k * n);
    }
    if (!readable) continue;
    let plug = true;
    let release = true;
    for (let i = 0; i < n && (plug || release); i++) {
      let mask = 0;
      for (const r of rows) mask |= 1 << (table[r + i] as number);
      const packed = chamberMasks(profile, cache, own, i, mask, control[i] as number);
      const bit = 1 << (depths[i] as number);
      if ((packed & bit) === 0) plug = false;
      if (((packed >>> 10) & bit) === 0) release = false;
    }
    if (plug || release) out.push({ core: c, how: plug ? (intended ? 'intended' : 'incidental') : 'control' });
  }
  return out;
}
