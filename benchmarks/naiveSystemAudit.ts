/**
 * The all-pairs baseline for the system audit: every key tested against every core with
 * keyOperates (plug and control line from one call), every pair of change keys compared
 * cut by cut. It runs the same checks as auditSystem (through auditSystemWith) and must
 * return identical findings; the bench and a unit test hold it to that, and the bench
 * measures how much the indexed searches save.
 */
import { auditSystemWith, keyOperates, sortCloseGroups } from '../shared/keying';
import type { SystemAuditContext, SystemAuditFinders, SystemAuditFinding, SystemAuditInput, CloseGroup, Profile } from '../shared/keying';

/** Both answers of one keyOperates call per key and core, kept for the second finder. */
const pairs = new WeakMap<SystemAuditContext, { turning: number[][]; releasing: number[][] }>();

function testEveryPair(ctx: SystemAuditContext): { turning: number[][]; releasing: number[][] } {
  let done = pairs.get(ctx);
  if (done) return done;
  const turning: number[][] = [];
  const releasing: number[][] = [];
  for (const pinning of ctx.pinnings) {
    const t: number[] = [];
    const r: number[] = [];
    for (const k of ctx.validKeys) {
      const does = keyOperates(pinning, ctx.profile, ctx.depths[k] as number[]);
      if (does.plug) t.push(k);
      if (does.control) r.push(k);
    }
    turning.push(t);
    releasing.push(r);
  }
  done = { turning, releasing };
  pairs.set(ctx, done);
  return done;
}

export const allPairs: SystemAuditFinders = {
  keysTurning: (ctx) => testEveryPair(ctx).turning,
  keysReleasing: (ctx) => testEveryPair(ctx).releasing,

  closeChangeKeys(ctx: SystemAuditContext): CloseGroup[] {
    const keys = ctx.validKeys.filter((k) => ctx.isChange[k]);
    const groups = new Map<string, { position: number; keys: Set<number> }>();
    for (let a = 0; a < keys.length; a++) {
      const ka = keys[a] as number;
      const da = ctx.depths[ka] as number[];
      for (let b = a + 1; b < keys.length; b++) {
        const kb = keys[b] as number;
        const db = ctx.depths[kb] as number[];
        let differ = 0;
        let position = -1;
        for (let i = 0; i < da.length && differ < 2; i++) {
          if (da[i] !== db[i]) { differ++; position = i; }
        }
        if (differ !== 1) continue;
        const id = `${position}:${da.map((d, i) => (i === position ? '*' : d)).join('')}`;
        const group = groups.get(id) ?? { position, keys: new Set<number>() };
        group.keys.add(ka).add(kb);
        groups.set(id, group);
      }
    }
    return sortCloseGroups(
      [...groups.values()].map((g) => ({ position: g.position, keys: [...g.keys].sort((x, y) => x - y) })),
    );
  },
};

export function naiveSystemAudit(profile: Profile, system: SystemAuditInput): SystemAuditFinding[] {
  return auditSystemWith(profile, system, allPairs);
}
