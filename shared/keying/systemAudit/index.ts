export { auditSystem, auditSystemWith } from './auditSystem';
export { defaultOpeningsThreshold } from './coreFindings';
export type { SystemAuditContext } from './context';
export type { SystemAuditFinders, CloseGroup } from './finders';
export { sortCloseGroups } from './finders';
export type { SystemAuditCore, SystemAuditFinding, SystemAuditInput, SystemAuditKey, FindingSeverity, KeyLevel } from './types';
