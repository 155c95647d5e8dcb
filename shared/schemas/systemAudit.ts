/**
 * The system audit as the API answers it: the engine's findings on a key system (shared/keying),
 * each with its fingerprint and, where an administrator accepted it, the acknowledgement.
 */
import { z } from 'zod';
import { systemAuditFindingCodes } from '../keying';

const codes = Object.keys(systemAuditFindingCodes) as [keyof typeof systemAuditFindingCodes, ...(keyof typeof systemAuditFindingCodes)[]];
export const Acknowledgement = z.object({ note: z.string(), by: z.string(), at: z.string() });
export type Acknowledgement = z.infer<typeof Acknowledgement>;
export const SystemAuditReportFinding = z.object({
  code: z.enum(codes),
  severity: z.enum(['error', 'warning', 'info']),
  message: z.string(),
  advice: z.string(),
  keys: z.array(z.string()).optional(),
  keyIds: z.array(z.string()).optional(),
  cores: z.array(z.string()).optional(),
  chambers: z.array(z.number()).optional(),
  data: z.record(z.string(), z.number()).optional(),
  details: z.array(z.string()).optional(),
  fingerprint: z.string(),
  acknowledged: Acknowledgement.nullable(),
});
export type SystemAuditReportFinding = z.infer<typeof SystemAuditReportFinding>;
export const SystemAudit = z.object({ findings: z.array(SystemAuditReportFinding), keys: z.number(), cores: z.number() });
export type SystemAudit = z.infer<typeof SystemAudit>;
/** A finding an administrator accepted, with the note. */
export const FindingAcknowledged = z.object({ fingerprint: z.string(), acknowledgement: Acknowledgement });
export type FindingAcknowledged = z.infer<typeof FindingAcknowledged>;
