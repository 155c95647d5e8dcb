/**
 * The geometry of the Core view: where each part, spring and cap of one core goes in
 * the SVG. Pure, so the proportions are tested in node and CoreView.vue only draws.
 *
 * Stacks stand bottom-aligned, as in the loading tool, so level tops mean a good load
 * (keying-primer bench procedure step 3). The shear lines are schematic: drawn where a
 * key cut to the deepest depth would put them, the nearest a key comes to the stacks at
 * rest. So with the key out a part spans each line, which is what locks the core.
 */
import type { Profile } from '@shared/keying';
import type { PartStatus } from './sessionView';
import { partName, type LoadingStep, type PartStepKind } from './steps';

export const UNIT = 14;
// Narrow gaps and a short right margin keep the drawing wide on screen, so labels drawn at
// LABEL_FONT stay at least 12 px on a 1280x800 tablet (the legend is HTML, under the SVG).
const COL = 64;
const GAP = 24;
const LEFT = 24;
const RIGHT = 118;
const TOP = 58;
const SPRING_UNITS = 4.5;
const CAP_UNITS = 1.2;
/** The tip of every bottom pin below the zero line, the same for all, so a size-0 pin has a body too. */
export const TIP = 24;
// Room under the stacks for the end labels.
const FOOT = 48;
/** Part labels, in drawing units (CoreView.vue uses the same figure). */
export const LABEL_FONT = 21;
/** The "now" pointer: a triangle in the gap beside the current part, clear of the next chamber. */
export const POINTER = { inset: 3, width: 14, height: 20 } as const;
/** The word "now" over the current chamber, between its number and its cap (CoreView.vue's figure). */
export const NOW_FONT = 19;

export interface DrawnPart {
  id: string;
  chamber: number;
  kind: PartStepKind;
  /** Master wafer level from the key up (1 = lowest), for the copper tone; null otherwise. */
  level: number | null;
  short: string;
  size: number;
  /** Baseline of the label, moved off a shear line so no line runs through the digits. */
  labelY: number;
  x: number;
  y: number;
  w: number;
  /** Height in the stack: size × UNIT. */
  h: number;
  /** Drawn below the zero line as well (bottom pins: TIP), so every part has a visible body. */
  tip: number;
  status: PartStatus;
}

export interface DrawnChamber {
  chamber: number;
  x: number;
  /** Centre, for the chamber number. */
  cx: number;
  spring: { points: string; status: PartStatus };
  cap: { x: number; y: number; w: number; h: number; status: PartStatus };
}

export interface CoreDrawing {
  width: number;
  height: number;
  /** The zero line: where a stack's units start. */
  baseY: number;
  /** The floor of the chambers, under the bottom pins' tips. */
  floorY: number;
  parts: DrawnPart[];
  chambers: DrawnChamber[];
  lines: { x1: number; x2: number; operatingY: number; controlY: number };
  /** Marks the current part; null when no part is current (springs, cap, key checks). */
  pointer: { points: string; box: { x: number; y: number; w: number; h: number }; word: { x: number; y: number } } | null;
  ends: { left: 'Back' | 'Front'; right: 'Back' | 'Front' };
  summary: string;
}

const shortOf = (step: LoadingStep): string => {
  const n = step.ofKind ? String(step.ofKind.n) : '';
  return { bottom: 'B', master: `M${n || 1}`, buildUp: `BU${n}`, top: 'T' }[step.kind as PartStepKind];
};

function springPoints(cx: number, bottom: number, top: number): string {
  const turns = 6;
  const step = (bottom - top) / (turns * 2);
  const pts = [`${cx},${bottom}`];
  for (let i = 1; i < turns * 2; i++) pts.push(`${cx + (i % 2 ? -COL / 4 : COL / 4)},${bottom - i * step}`);
  pts.push(`${cx},${top}`);
  return pts.join(' ');
}

export function coreDrawing(plan: readonly LoadingStep[], profile: Profile, status: Readonly<Record<string, PartStatus>> = {}): CoreDrawing {
  const stackTop = TOP + (CAP_UNITS + SPRING_UNITS) * UNIT;
  const baseY = stackTop + profile.stackUnits * UNIT;
  const of = (id: string): PartStatus => status[id] ?? 'done';
  const operatingY = baseY - profile.maxDepth * UNIT;
  const controlY = baseY - (profile.maxDepth + profile.sleeveUnits) * UNIT;
  const parts: DrawnPart[] = [];
  const chambers: DrawnChamber[] = [];
  for (let c = 1; c <= profile.chambers; c++) {
    const x = LEFT + (c - 1) * (COL + GAP);
    let filled = 0;
    for (const step of plan.filter((s) => s.chamber === c)) {
      const size = step.size ?? 0;
      const tip = step.kind === 'bottom' ? TIP : 0;
      // A size-0 part is a real part: a bottom pin shows its tip; any other gets a sliver.
      const h = tip ? size * UNIT : Math.max(size * UNIT, 5);
      const y = baseY - filled * UNIT - h;
      parts.push({
        id: step.id, chamber: c, kind: step.kind as PartStepKind, level: step.kind === 'master' ? (step.ofKind?.n ?? 1) : null,
        short: shortOf(step), size, labelY: labelY(y, h + tip, [operatingY, controlY]), x, y, w: COL, h, tip, status: of(step.id),
      });
      filled += size;
    }
    const cx = x + COL / 2;
    chambers.push({
      chamber: c, x, cx,
      spring: { points: springPoints(cx, stackTop, stackTop - SPRING_UNITS * UNIT + 4), status: of('springs') },
      cap: { x: x - 4, y: TOP, w: COL + 8, h: CAP_UNITS * UNIT, status: of('cap') },
    });
  }
  const x2 = LEFT + profile.chambers * (COL + GAP) - GAP + 12;
  const width = x2 + RIGHT;
  const back = profile.chamberOneAt === 'back';
  return {
    width, height: baseY + TIP + FOOT, baseY, floorY: baseY + TIP, parts, chambers,
    lines: { x1: LEFT - 12, x2, operatingY, controlY },
    pointer: pointerOf(parts.find((p) => p.status === 'current')),
    ends: { left: back ? 'Back' : 'Front', right: back ? 'Front' : 'Back' },
    summary: summaryOf(plan, profile, status),
  };
}

/**
 * The triangle stays inside the gap to the next chamber (GAP), tip towards the part, and the word
 * "now" stands over the chamber: beside the part it ran into the next chamber's stack.
 */
function pointerOf(p: DrawnPart | undefined): CoreDrawing['pointer'] {
  if (!p) return null;
  const x = p.x + p.w + POINTER.inset;
  const y = p.y + (p.h + p.tip) / 2;
  const half = POINTER.height / 2;
  return {
    points: `${x},${y} ${x + POINTER.width},${y - half} ${x + POINTER.width},${y + half}`,
    box: { x, y: y - half, w: POINTER.width, h: POINTER.height },
    word: { x: p.x + p.w / 2, y: TOP - 6 },
  };
}

/** Digit height at LABEL_FONT, in drawing units. */
const GLYPH = 15;

/** Centred in the part unless a line crosses the digits; then just below or above the line. */
export function labelY(y: number, h: number, lines: number[]): number {
  const centre = y + h / 2 + GLYPH / 2;
  const line = lines.find((l) => l >= centre - GLYPH - 3 && l <= centre + 3);
  if (line === undefined) return centre;
  if (line + GLYPH + 5 <= y + h - 2) return line + GLYPH + 5;
  if (line - GLYPH - 5 >= y + 2) return line - 5;
  return centre;
}

/** The aria-label: progress and the current part only, never the whole chart. */
function summaryOf(plan: readonly LoadingStep[], profile: Profile, status: Readonly<Record<string, PartStatus>>): string {
  const parts = plan.filter((s) => s.chamber !== null);
  const done = parts.filter((s) => (status[s.id] ?? 'done') === 'done').length;
  const now = plan.find((s) => status[s.id] === 'current');
  const words = [`Core view: ${profile.chambers} chambers, chamber 1 at the ${profile.chamberOneAt}.`, `${done} of ${parts.length} parts in.`];
  if (now?.chamber != null) words.push(`Now: chamber ${now.chamber}, ${partName(now).toLowerCase()}, size ${now.size}.`);
  else if (now) words.push(`Now: ${now.partLabel.toLowerCase()}.`);
  words.push((status.springs ?? 'done') === 'done' ? 'Springs in.' : 'Springs not in yet.');
  words.push((status.cap ?? 'done') === 'done' ? 'Capped.' : 'Not capped yet.');
  return words.join(' ');
}
