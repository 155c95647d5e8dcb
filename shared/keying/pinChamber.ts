import { hasBottom, hasTop, hasWafer, splitBuildUp, type StockTable } from './stock';
import type { ChamberPinning, PinningIssue } from './types';

/**
 * One chamber's stack from its operating depths and the control depth, with the
 * problems found on the way pushed onto `issues`. The parts follow the usual formulas:
 * bottom = shallowest depth, masters = gaps between successive depths,
 * build-up = control + sleeve - deepest depth, top = stack - (control + sleeve).
 * Negative parts are shown as 0 and reported, so the chart never silently lies.
 */
export function pinChamber(
  stock: StockTable,
  chamber: number,
  depths: number[],
  control: number,
  issues: PinningIssue[],
): ChamberPinning {
  const { profile } = stock;
  const bottom = depths[0] as number;
  const deepest = depths[depths.length - 1] as number;
  if (!hasBottom(stock, bottom)) {
    issues.push({
      code: 'size-not-stocked', severity: 'error', chamber,
      message: `Chamber ${chamber}: no bottom pin of size ${bottom} is stocked — add it to the kit, or change the shallowest cut in chamber ${chamber}.`,
    });
  }

  const masters: number[] = [];
  let oddWafer = false;
  for (let j = 1; j < depths.length; j++) {
    const lower = depths[j - 1] as number;
    const upper = depths[j] as number;
    const m = upper - lower;
    masters.push(m);
    if (m % 2 !== 0) oddWafer = true;
    if (m < profile.minWaferUnits) {
      issues.push({
        code: 'wafer-too-thin', severity: 'error', chamber,
        message: `Chamber ${chamber}: depths ${lower} and ${upper} need a ${m}-unit master wafer, thinner than the ${profile.minWaferUnits}-unit minimum — change one key’s cut in chamber ${chamber} so the depths differ by ${profile.minWaferUnits} or more.`,
      });
    } else if (!hasWafer(stock, m)) {
      // Two stacked master wafers would add a break, hence an extra depth that turns the plug.
      issues.push({
        code: 'size-not-stocked', severity: 'error', chamber,
        message: `Chamber ${chamber}: a ${m}-unit master wafer (between depths ${lower} and ${upper}) is not stocked, and two wafers would add a shear point — stock that size, or change one key’s cut in chamber ${chamber}.`,
      });
    }
  }
  if (oddWafer && profile.step === 2) {
    issues.push({
      code: 'parity-broken', severity: 'warning', chamber,
      message: `Chamber ${chamber}: operating depths ${depths.join(', ')} mix odd and even — under two-step progression every key keeps the top master’s parity here; recut the key that breaks it.`,
    });
  }

  const controlLine = control + profile.sleeveUnits;
  let buildUpUnits = controlLine - deepest;
  if (buildUpUnits < 0) {
    issues.push({
      code: 'stack-mismatch', severity: 'error', chamber,
      message: `Chamber ${chamber}: the deepest operating cut ${deepest} sits above the control shear line (control ${control} + sleeve ${profile.sleeveUnits}) — use a deeper control cut or a shallower operating cut in chamber ${chamber}.`,
    });
    buildUpUnits = 0;
  }
  const buildUp = pickBuildUp(stock, chamber, buildUpUnits, depths, control, issues);

  let top = profile.stackUnits - controlLine;
  if (top < 0) {
    issues.push({
      code: 'stack-mismatch', severity: 'error', chamber,
      message: `Chamber ${chamber}: control ${control} + sleeve ${profile.sleeveUnits} is taller than the ${profile.stackUnits}-unit stack, leaving no room for a top pin — choose a shallower control cut in chamber ${chamber}.`,
    });
    top = 0;
  } else if (!hasTop(stock, top)) {
    issues.push({
      code: 'size-not-stocked', severity: 'error', chamber,
      message: `Chamber ${chamber}: no top pin of size ${top} is stocked (stack ${profile.stackUnits} − control ${control} − sleeve ${profile.sleeveUnits}) — add it to the kit, or choose another control cut in chamber ${chamber}.`,
    });
  }

  // By the formulas the parts always total the stack; only a clamped part (reported
  // above as stack-mismatch) makes `total` differ, and the chart shows that difference.
  let total = bottom + top;
  for (const m of masters) total += m;
  for (const w of buildUp) total += w;
  return { chamber, depths, bottom, masters, buildUp, top, total };
}

function pickBuildUp(
  stock: StockTable,
  chamber: number,
  units: number,
  depths: number[],
  control: number,
  issues: PinningIssue[],
): number[] {
  const { profile } = stock;
  if (units === 0) return [];
  const deepest = depths[depths.length - 1] as number;
  if (units < profile.minWaferUnits) {
    issues.push({
      code: 'wafer-too-thin', severity: 'error', chamber,
      message: `Chamber ${chamber}: the build-up would be ${units} unit${units === 1 ? '' : 's'} (control ${control} + sleeve ${profile.sleeveUnits} − deepest cut ${deepest}), thinner than the ${profile.minWaferUnits}-unit minimum — choose a control cut of ${deepest + profile.minWaferUnits - profile.sleeveUnits} or deeper in chamber ${chamber}, or a shallower deepest operating cut.`,
    });
    return [units];
  }
  if (hasWafer(stock, units)) return [units];
  const pair = splitBuildUp(stock, units, depths);
  if (pair) return pair;
  const largest = Math.max(...profile.wafers);
  issues.push({
    code: 'size-not-stocked', severity: 'error', chamber,
    message: `Chamber ${chamber}: a build-up of ${units} units cannot be made from stocked wafers (largest ${largest}; two wafers must be stocked sizes with their seam above depth ${profile.maxDepth}) — choose a control cut closer to the deepest operating cut (${deepest}) in chamber ${chamber}, or stock a wafer of ${units} units.`,
  });
  return [units];
}
