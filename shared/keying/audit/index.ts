export { auditSystem, auditSystemWith } from './auditSystem';
export { defaultOpeningsThreshold } from './coreFindings';
export type { AuditContext } from './context';
export type { AuditFinders, CloseGroup } from './finders';
export { sortCloseGroups } from './finders';
export type { AuditCore, AuditFinding, AuditInput, AuditKey, FindingSeverity, KeyLevel } from './types';
