import type { KeyingIssueCode } from '../codes';
import type { SystemAuditContext } from './context';
import { coreIds, coreName, finding, keyRefs, nameList, plural, type Ranked } from './format';

/**
 * The system's default openings threshold: 1,024 bittings per core (common practice,
 * no published figure; a core with change key, master and grand master usually stays
 * well below it). Administrators set their own per system.
 */
export const defaultOpeningsThreshold = 1024;

/* pinCore errors that make a core unbuildable (every one of them an error in codes.ts); control problems are reported system-wide. */
const buildCodes = new Set<KeyingIssueCode>([
  'no-operating-keys', 'wafer-too-thin', 'size-not-stocked', 'stack-mismatch', 'operating-releases-core',
]);

/** Findings about the control key and about each core's pinning. */
export function coreFindings(ctx: SystemAuditContext): Ranked[] {
  const out: Ranked[] = [];
  const { system, control, depths } = ctx;
  let controlCode = 0;
  for (const d of control) controlCode = controlCode * 10 + d;
  const sameAsControl: number[] = [];
  for (let k = ctx.byBitting.first(controlCode); k !== -1; k = ctx.byBitting.next(k)) sameAsControl.push(k);
  if (sameAsControl.length > 0) {
    const refs = keyRefs(ctx, sameAsControl);
    out.push(finding('control-equals-key', sameAsControl[0] as number, {
      message: `Key${sameAsControl.length === 1 ? '' : 's'} ${nameList(refs.keys)} ${sameAsControl.length === 1 ? 'has' : 'have'} the control key’s bitting: whoever holds ${sameAsControl.length === 1 ? 'it' : 'them'} can remove cores.`,
      advice: 'Choose a new control key, or recut and reissue those keys; then re-pin the affected cores.',
      ...refs,
    }));
  }

  const plugCores: number[] = [];
  ctx.pinnings.forEach((pinning, c) => {
    const problems = pinning.issues.filter((i) => buildCodes.has(i.code));
    if (pinning.issues.some((i) => i.code === 'control-turns-plug')) plugCores.push(c);
    if (problems.length > 0) {
      const first = problems.slice(0, 3).map((p) => p.message).join(' ');
      out.push(finding('core-unbuildable', c, {
        message: `Core ${coreName(ctx, c)} cannot be pinned as planned (${plural(problems.length, 'problem')}): ${first}`,
        advice: 'Fix the problems named, then run the system audit again; the Bench will not load this core until then.',
        cores: coreIds(ctx, [c]),
        chambers: [...new Set(problems.flatMap((p) => (p.chamber === undefined ? [] : [p.chamber])))],
      }));
    }
    const threshold = system.openingsThreshold ?? defaultOpeningsThreshold;
    if (pinning.chambers.length > 0 && pinning.openingsCount > threshold) {
      out.push(finding('openings-over-threshold', c, {
        message: `Core ${coreName(ctx, c)} accepts ${plural(pinning.openingsCount, 'bitting')} (openings count), over this system’s threshold of ${threshold.toLocaleString('en-US')}.`,
        advice: 'Pin the core for fewer keys, or choose masters that share more depths with its change key, so fewer chambers carry several depths.',
        cores: coreIds(ctx, [c]), data: { openingsCount: pinning.openingsCount, threshold },
      }));
    }
  });
  if (plugCores.length > 0) {
    out.push(finding('control-turns-plug', 0, {
      message: `The control key would turn the plug of ${plural(plugCores.length, 'core')}: ${nameList(plugCores.slice(0, 6).map((c) => coreName(ctx, c)), 5, plugCores.length)}.`,
      advice: 'Choose a control key whose cut, in at least one chamber of each core, is none of its operating depths (better: differs from the top master in every chamber).',
      cores: coreIds(ctx, plugCores), data: { cores: plugCores.length },
    }));
  }

  if (ctx.topMaster >= 0) {
    const top = depths[ctx.topMaster] as number[];
    const shared = control.flatMap((d, i) => (d === top[i] ? [i + 1] : []));
    if (shared.length > 0) {
      out.push(finding('control-shares-top-master', 0, {
        message: `The control key has the top master’s depth in chamber${shared.length === 1 ? '' : 's'} ${shared.join(', ')}.`,
        advice: 'The usual advice is a control key that differs from the top master in every chamber; change those cuts when the control key is next replaced.',
        ...keyRefs(ctx, [ctx.topMaster]), chambers: shared,
      }));
    }
  }
  return out;
}
