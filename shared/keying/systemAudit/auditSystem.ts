import { readBitting } from '../bitting';
import type { Profile } from '../types';
import { accessIndex } from './accessIndexFinder';
import { accessFindings } from './accessFindings';
import { buildContext } from './context';
import { coreFindings } from './coreFindings';
import { exposureFinding } from './exposure';
import type { SystemAuditFinders } from './finders';
import { finding, sortFindings, type Ranked } from './format';
import { keyFindings } from './keyFindings';
import { releaseFindings } from './releaseFindings';
import type { SystemAuditFinding, SystemAuditInput } from './types';

/**
 * Audits a whole system with the given searches. Exposed so a baseline (the all-pairs
 * audit in benchmarks/) can run the same checks with its own searches and be compared.
 */
export function auditSystemWith(profile: Profile, system: SystemAuditInput, finders: SystemAuditFinders): SystemAuditFinding[] {
  const ctx = buildContext(profile, system);
  if (!ctx) {
    const reading = readBitting(profile, system.control);
    return [finding('bad-bitting', 0, {
      message: `Control key: ${reading.ok ? '' : reading.message}`,
      advice: 'Correct the control key first: no core can be pinned, so nothing else was checked.',
    }).finding];
  }
  const ranked: Ranked[] = [
    ...keyFindings(ctx, finders.closeChangeKeys(ctx)),
    ...coreFindings(ctx),
    ...accessFindings(ctx, finders.keysTurning(ctx)),
    ...releaseFindings(ctx, finders.keysReleasing(ctx)),
  ];
  const exposure = exposureFinding(ctx);
  if (exposure) ranked.push(exposure);
  return sortFindings(ranked);
}

/**
 * Every problem in a system, errors first: unintended access, keys that release cores
 * they are not the control key of, intended keys that fail, unbuildable cores, large
 * openings counts, duplicate and too-close keys, control-key problems, cut-rule breaks,
 * and the summaries (control openings, change keys one position apart, rights
 * amplification). Messages name keys by symbol and cores by label (tag and door), never
 * by a position in a list; `keyIds` and `cores` carry the ids.
 */
export function auditSystem(profile: Profile, system: SystemAuditInput): SystemAuditFinding[] {
  return auditSystemWith(profile, system, accessIndex);
}
