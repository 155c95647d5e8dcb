import { keysTurningIndexed } from './accessIndex';
import { closeChangeKeysHashed } from './closeKeys';
import type { SystemAuditFinders } from './finders';
import { keysReleasingIndexed } from './releaseIndex';

/** The indexed searches auditSystem uses. */
export const accessIndex: SystemAuditFinders = {
  keysTurning: keysTurningIndexed,
  keysReleasing: keysReleasingIndexed,
  closeChangeKeys: closeChangeKeysHashed,
};
