import { keysTurningIndexed } from './accessIndex';
import { closeChangeKeysHashed } from './closeKeys';
import type { AuditFinders } from './finders';
import { keysReleasingIndexed } from './releaseIndex';

/** The indexed searches auditSystem uses. */
export const accessIndex: AuditFinders = {
  keysTurning: keysTurningIndexed,
  keysReleasing: keysReleasingIndexed,
  closeChangeKeys: closeChangeKeysHashed,
};
