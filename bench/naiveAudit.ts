/**
 * The all-pairs baseline for the system audit: every key tested against every core with
 * keyOperates, every pair of change keys compared cut by cut. It runs the same checks as
 * auditSystem (through auditSystemWith) and must return identical findings; the bench
 * and a unit test hold it to that, and the bench measures how much the indexed searches
 * save.
 */
import { auditSystemWith, keyOperates, sortCloseGroups } from '../shared/keying';
import type { AuditContext, AuditFinders, AuditFinding, AuditInput, CloseGroup, Profile } from '../shared/keying';

export const allPairs: AuditFinders = {
  keysTurning(ctx: AuditContext): number[][] {
    return ctx.pinnings.map((pinning) => {
      const out: number[] = [];
      for (const k of ctx.validKeys) {
        if (keyOperates(pinning, ctx.profile, ctx.depths[k] as number[]).plug) out.push(k);
      }
      return out;
    });
  },

  closeChangeKeys(ctx: AuditContext): CloseGroup[] {
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

export function naiveAudit(profile: Profile, system: AuditInput): AuditFinding[] {
  return auditSystemWith(profile, system, allPairs);
}
