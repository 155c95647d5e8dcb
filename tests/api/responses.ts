/**
 * The schema of every API answer, by route: the harness parses each answer it gets with the
 * route's schema (errors with the shared error schema), so a server that drifts from what the
 * client parses fails the test that called it. A route missing here fails too: register new ones.
 * CSV exports are checked as text/csv only; the development mailbox is JSON and has its schema.
 */
import type { z } from 'zod';
import { AuditPage } from '../../shared/schemas/auditEvents';
import { Health, Me, PasswordSet, SignInResponse } from '../../shared/schemas/auth';
import { Ok } from '../../shared/schemas/common';
import { CompletionAnswer, CompletionPage } from '../../shared/schemas/completions';
import { CoreAnswer, CoreList } from '../../shared/schemas/cores';
import { AdminDeviceList, EscrowResponse } from '../../shared/schemas/devices';
import { Mailbox } from '../../shared/schemas/devMailbox';
import { DoorAnswer, DoorHistory, DoorList } from '../../shared/schemas/doors';
import { ApiErrorBody } from '../../shared/schemas/errors';
import { ImportResult } from '../../shared/schemas/imports';
import { InstallMismatchList, InstallReview } from '../../shared/schemas/installs';
import { KeyIds, KeyList, KeyOperatesList, KeyReplacement, KeySystemAnswer, KeySystemList } from '../../shared/schemas/keySystems';
import { ControlKeyList, CutList, DepartmentAnswer, DepartmentList, HolderAnswer, HolderList, KeyIssueAnswer, KeyIssueList, OutstandingKeys } from '../../shared/schemas/keyControl';
import { DoorAccess, ExposureAnswer, HolderAccess, KeyReportAnswer, KeyReportList } from '../../shared/schemas/keyControlExposure';
import { KeyAuditLinkAnswer, KeyAuditAnswer, KeyAuditList } from '../../shared/schemas/keyControlKeyAudits';
import { RekeyPlanAnswer, RekeyWorkOrderDone } from '../../shared/schemas/keyControlRekey';
import { ReissueTaskAnswer, ReissueTaskList } from '../../shared/schemas/keyControlReissue';
import { KeyProposal, KeyRequestAnswer, KeyRequestList, LinkRequestAnswer } from '../../shared/schemas/keyControlRequests';
import { ProfileAnswer, ProfileList } from '../../shared/schemas/profiles';
import { ProgressionPreview } from '../../shared/schemas/records';
import { SyncResponse } from '../../shared/schemas/sync';
import { FindingAcknowledged, SystemAudit } from '../../shared/schemas/systemAudit';
import { AdminUserAnswer, AdminUserList, TechnicianList } from '../../shared/schemas/users';
import { PacketAnswer, PinningPreview, WorkOrderAnswer, WorkOrderDetail, WorkOrderDoorsAdded, WorkOrderList } from '../../shared/schemas/workOrders';

/** What a route answers on success: a JSON schema, CSV text, no body (204), or a redirect elsewhere (308). */
export interface Answer {
  schema: z.ZodType | 'csv' | 'empty' | 'moved';
  /** Statuses of 400 and above that still answer with the route's own schema (health's 503, an import's 422). */
  alsoFor?: number[];
}

const json = (schema: z.ZodType, alsoFor?: number[]): Answer => ({ schema, ...(alsoFor ? { alsoFor } : {}) });
const csv: Answer = { schema: 'csv' };
const moved: Answer = { schema: 'moved' };

/** `METHOD path` as registered in Express (server/routes/*.ts) → its answer. */
export const answers: Record<string, Answer> = {
  'GET /api/health': json(Health, [503]),
  'GET /api/departments': json(DepartmentList),
  'POST /api/departments': json(DepartmentAnswer),
  'GET /api/holders': json(HolderList),
  'POST /api/holders': json(HolderAnswer.pick({ holder: true })),
  'POST /api/holders/import': json(ImportResult, [422]),
  'GET /api/holders/:id': json(HolderAnswer),
  'PATCH /api/holders/:id': json(HolderAnswer),
  'GET /api/holders/:id/access': json(HolderAccess),
  'GET /api/key-systems/:id/control-keys': json(ControlKeyList),
  'GET /api/key-issues': json(KeyIssueList),
  'POST /api/key-issues': json(KeyIssueAnswer),
  'GET /api/key-issues/outstanding': json(OutstandingKeys),
  'GET /api/key-issues/cut-list': json(CutList),
  'GET /api/key-issues/:id': json(KeyIssueAnswer),
  'POST /api/key-issues/:id/return': json(KeyIssueAnswer),
  'POST /api/key-issues/:id/transfer': json(KeyIssueAnswer),
  'POST /api/key-issues/:id/report': json(KeyReportAnswer),
  'GET /api/keys/:id/exposure': json(ExposureAnswer),
  'GET /api/key-systems/:id/control-exposure': json(ExposureAnswer),
  'GET /api/doors/:id/access': json(DoorAccess),
  'GET /api/key-reports': json(KeyReportList),
  'GET /api/key-reports/:id': json(KeyReportAnswer),
  'GET /api/key-reports/:id/plan': json(RekeyPlanAnswer),
  'POST /api/key-reports/:id/work-order': json(RekeyWorkOrderDone),
  'POST /api/key-reports/:id/close': json(KeyReportAnswer),
  'POST /api/key-requests/proposal': json(KeyProposal),
  'POST /api/key-requests': json(KeyRequestAnswer),
  'GET /api/key-requests': json(KeyRequestList),
  'GET /api/key-requests/:id': json(KeyRequestAnswer),
  'POST /api/key-requests/:id/decision': json(KeyRequestAnswer),
  'POST /api/key-requests/:id/resend': json(KeyRequestAnswer),
  'POST /api/key-request-links/view': json(LinkRequestAnswer),
  'POST /api/key-request-links/decide': json(LinkRequestAnswer),
  'POST /api/key-audits': json(KeyAuditAnswer),
  'GET /api/key-audits': json(KeyAuditList),
  'GET /api/key-audits/:id': json(KeyAuditAnswer),
  'POST /api/key-audits/:id/reminders': json(KeyAuditAnswer),
  'POST /api/key-audits/:id/holders/:holderId/resend': json(KeyAuditAnswer),
  'POST /api/key-audits/:id/close': json(KeyAuditAnswer),
  'GET /api/key-reissue-tasks': json(ReissueTaskList),
  'POST /api/key-reissue-tasks/:id/issue': json(ReissueTaskAnswer),
  'POST /api/key-audit-links/view': json(KeyAuditLinkAnswer),
  'POST /api/key-audit-links/confirm': json(KeyAuditLinkAnswer),
  // The key audit's paths before the rename: a 308 to the new ones.
  'POST /api/key-campaigns': moved,
  'GET /api/key-campaigns': moved,
  'GET /api/key-campaigns/:id': moved,
  'POST /api/key-campaign-links/view': moved,
  'POST /api/key-campaign-links/confirm': moved,
  'POST /api/auth/sign-in': json(SignInResponse),
  'POST /api/auth/refresh': json(SignInResponse),
  'POST /api/auth/set-password': json(PasswordSet),
  'POST /api/auth/sign-out': { schema: 'empty' },
  'GET /api/auth/me': json(Me),
  'GET /api/dev/mailbox': json(Mailbox),
  'GET /api/users': json(AdminUserList),
  'GET /api/technicians': json(TechnicianList),
  'POST /api/users': json(AdminUserAnswer),
  'PATCH /api/users/:id': json(AdminUserAnswer),
  'POST /api/users/:id/invitation': json(AdminUserAnswer),
  'GET /api/audit-events': json(AuditPage),
  'GET /api/audit-events.csv': csv,
  'GET /api/profiles': json(ProfileList),
  'POST /api/profiles': json(ProfileAnswer),
  'PUT /api/profiles/:pid': json(ProfileAnswer),
  'GET /api/key-systems': json(KeySystemList),
  'POST /api/key-systems': json(KeySystemAnswer),
  'GET /api/key-systems/:id': json(KeySystemAnswer),
  'PATCH /api/key-systems/:id': json(KeySystemAnswer),
  'GET /api/key-systems/:id/keys': json(KeyList),
  'POST /api/key-systems/:id/keys': json(KeyIds),
  'PATCH /api/key-systems/:id/keys/:keyId': json(Ok),
  'GET /api/key-systems/:id/keys/:keyId/operates': json(KeyOperatesList),
  'POST /api/key-systems/:id/keys/:keyId/replace': json(KeyReplacement),
  'POST /api/key-systems/:id/progression': json(ProgressionPreview),
  'POST /api/key-systems/:id/import': json(ImportResult, [422]),
  'GET /api/key-systems/:id/system-audit': json(SystemAudit),
  'POST /api/key-systems/:id/system-audit/acknowledgements': json(FindingAcknowledged),
  // The system audit's old paths: a 308 to the new ones (a redirect carries no body to check).
  'GET /api/key-systems/:id/audit': moved,
  'POST /api/key-systems/:id/audit/acknowledgements': moved,
  'GET /api/doors': json(DoorList),
  'POST /api/doors': json(DoorAnswer),
  'POST /api/doors/import': json(ImportResult, [422]),
  'GET /api/doors/:id': json(DoorAnswer),
  'PATCH /api/doors/:id': json(DoorAnswer),
  'GET /api/doors/:id/history': json(DoorHistory),
  'GET /api/cores': json(CoreList),
  'GET /api/cores/:id': json(CoreAnswer),
  'PATCH /api/cores/:id': json(CoreAnswer),
  'GET /api/work-orders': json(WorkOrderList),
  'POST /api/work-orders': json(WorkOrderAnswer),
  'GET /api/work-orders/:id': json(WorkOrderDetail),
  'PATCH /api/work-orders/:id': json(WorkOrderAnswer),
  'POST /api/work-orders/:id/doors': json(WorkOrderDoorsAdded),
  'DELETE /api/work-orders/:id/cores/:coreId': json(WorkOrderAnswer),
  'GET /api/work-orders/:id/packet': json(PacketAnswer),
  'GET /api/work-orders/:id/charts': json(PacketAnswer),
  'POST /api/pinning-preview': json(PinningPreview),
  'POST /api/sync': json(SyncResponse),
  'GET /api/completions': json(CompletionPage),
  'GET /api/completions.csv': csv,
  'GET /api/completions/:id': json(CompletionAnswer),
  'GET /api/installs/mismatches': json(InstallMismatchList),
  'POST /api/installs/:id/review': json(InstallReview),
  'POST /api/devices/escrow': json(EscrowResponse),
  'GET /api/devices': json(AdminDeviceList),
  'POST /api/devices/:id/revoke': json(Ok),
};

const escape = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
const patterns = Object.keys(answers).map((key) => {
  const [method, route] = key.split(' ') as [string, string];
  const re = new RegExp(`^${route.split('/').map((part) => (part.startsWith(':') ? '[^/]+' : escape(part))).join('/')}$`);
  return { key, method, re };
});

/** The registered route a request reached, as `METHOD pattern`; undefined when no entry matches. */
export function routeOf(method: string, path: string): string | undefined {
  const bare = path.split('?')[0]!;
  return patterns.find((p) => p.method === method.toUpperCase() && p.re.test(bare))?.key;
}

export class AnswerDrift extends Error {}

/**
 * Throws AnswerDrift when the answer does not match its schema: an error status with the
 * shared error schema, anything else with its route's. Redirects carry no body to check.
 */
export function checkAnswer(method: string, path: string, reply: { status: number; headers: Headers; text: string; json: unknown }, table: Record<string, Answer> = answers): void {
  const where = `${method.toUpperCase()} ${path.split('?')[0]} answered ${reply.status}`;
  if (reply.status >= 300 && reply.status < 400) return;
  const key = routeOf(method, path);
  const answer = key ? table[key] : undefined;
  const own = answer && (reply.status < 400 || answer.alsoFor?.includes(reply.status));
  if (!own) {
    if (reply.status < 400) throw new AnswerDrift(`${where}, but tests/api/responses.ts has no schema for this route: add one (a schema of shared/schemas).`);
    return parsed(ApiErrorBody, reply.json, where);
  }
  if (answer.schema === 'moved') throw new AnswerDrift(`${where}; this route only redirects (308).`);
  if (answer.schema === 'empty') {
    if (reply.text !== '') throw new AnswerDrift(`${where} with a body; this route answers 204 with none.`);
  } else if (answer.schema === 'csv') {
    if (!/^text\/csv\b/.test(reply.headers.get('content-type') ?? '')) throw new AnswerDrift(`${where} with ${reply.headers.get('content-type')}, not text/csv.`);
  } else parsed(answer.schema, reply.json, where);
}

function parsed(schema: z.ZodType, json: unknown, where: string): void {
  const result = schema.safeParse(json);
  if (!result.success) {
    const issues = result.error.issues.slice(0, 5).map((i) => `${i.path.join('.') || '(body)'}: ${i.message}`);
    throw new AnswerDrift(`${where}, and the answer does not match its schema: ${issues.join('; ')}`);
  }
}
