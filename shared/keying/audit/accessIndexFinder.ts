import { keysTurningIndexed } from './accessIndex';
import { closeChangeKeysHashed } from './closeKeys';
import type { AuditFinders } from './finders';

/** The indexed searches auditSystem uses. */
export const accessIndex: AuditFinders = {
  keysTurning: keysTurningIndexed,
  closeChangeKeys: closeChangeKeysHashed,
};
