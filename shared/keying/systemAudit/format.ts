import { systemAuditFindingCodes, type SystemAuditFindingCode } from '../codes';
import type { SystemAuditContext } from './context';
import type { SystemAuditFinding, FindingSeverity } from './types';

/** A finding plus the index it sorts by within its code (a key's or a core's position). */
export interface Ranked {
  finding: SystemAuditFinding;
  order: number;
}

export function finding(
  code: SystemAuditFindingCode,
  order: number,
  parts: Omit<SystemAuditFinding, 'code' | 'severity'>,
): Ranked {
  return { finding: { code, severity: systemAuditFindingCodes[code].severity, ...parts }, order };
}

const severityRank: Record<FindingSeverity, number> = { error: 0, warning: 1, info: 2 };
const codeRank = new Map(Object.keys(systemAuditFindingCodes).map((code, i) => [code, i]));

/** Errors first, then warnings, then information; within those by code, then system order. */
export function sortFindings(ranked: Ranked[]): SystemAuditFinding[] {
  return ranked
    .sort((a, b) =>
      severityRank[a.finding.severity] - severityRank[b.finding.severity] ||
      (codeRank.get(a.finding.code) ?? 0) - (codeRank.get(b.finding.code) ?? 0) ||
      a.order - b.order ||
      (a.finding.message < b.finding.message ? -1 : a.finding.message > b.finding.message ? 1 : 0))
    .map((r) => r.finding);
}

/**
 * "A, B, C and 4 more": long lists stay readable; the finding carries the full list.
 * `total` is the length of the whole list when only its first names are passed.
 */
export function nameList(names: readonly string[], max = 5, total = names.length): string {
  if (total <= max) {
    return total <= 1 ? (names[0] ?? '') : `${names.slice(0, total - 1).join(', ')} and ${names[total - 1]}`;
  }
  return `${names.slice(0, max).join(', ')} and ${total - max} more`;
}

export function keyRefs(ctx: SystemAuditContext, keys: readonly number[]): { keys: string[]; keyIds: string[] } {
  return {
    keys: keys.map((k) => ctx.system.keys[k]?.symbol ?? ''),
    keyIds: keys.map((k) => ctx.system.keys[k]?.id ?? ''),
  };
}

export function coreName(ctx: SystemAuditContext, c: number): string {
  const core = ctx.system.cores[c];
  return core?.label ?? core?.id ?? '';
}

export function coreIds(ctx: SystemAuditContext, cores: readonly number[]): string[] {
  return cores.map((c) => ctx.system.cores[c]?.id ?? '');
}

export function plural(n: number, one: string, many = `${one}s`): string {
  return `${grouped(n)} ${n === 1 ? one : many}`;
}

/**
 * A whole number with thousands commas ("12,345"), as toLocaleString('en-US') writes it,
 * without Intl: the audit writes tens of thousands of counts in a large system.
 */
export function grouped(n: number): string {
  if (!Number.isSafeInteger(n)) return n.toLocaleString('en-US');
  if (n > -1000 && n < 1000) return String(n);
  const digits = String(Math.abs(n));
  let out = '';
  for (let i = 0; i < digits.length; i++) {
    if (i > 0 && (digits.length - i) % 3 === 0) out += ',';
    out += digits[i];
  }
  return n < 0 ? `-${out}` : out;
}
