/**
 * Acknowledged system audit findings. A finding is identified by a fingerprint: an HMAC (under a
 * key derived from the data key, so a bitting cannot be guessed back from it) of its code,
 * its message, the control key and the bittings of every key it involves (its own keys
 * and the operating keys of its cores). Recut one of those keys and the fingerprint
 * changes, so the finding shows as new again.
 */
import { createHmac } from 'node:crypto';
import type { Knex } from 'knex';
import type { SystemAuditFinding, SystemAuditInput } from '../../shared/keying';
import type { Acknowledgement, SystemAuditReportFinding } from '../../shared/schemas/systemAudit';

export function fingerprinter(dataKey: Buffer, audit: SystemAuditInput): (f: SystemAuditFinding) => string {
  const key = createHmac('sha256', dataKey).update('corewright audit finding fingerprint v1').digest();
  const bitting = new Map(audit.keys.map((k) => [k.id, k.bitting.trim()]));
  const operating = new Map(audit.cores.map((c) => [c.id, c.operating]));
  return (f) => {
    const involved = new Set(f.keyIds ?? []);
    for (const core of f.cores ?? []) for (const k of operating.get(core) ?? []) involved.add(k);
    const mac = createHmac('sha256', key).update(`${f.code}\n${f.message}\n${audit.control.trim()}\n`);
    for (const id of [...involved].sort()) mac.update(`${id}=${bitting.get(id) ?? '?'}\n`);
    mac.update((f.cores ?? []).join(','));
    return mac.digest('hex');
  };
}

/** The findings with their fingerprints and, where an administrator acknowledged one, the note. */
export async function withAcknowledgements(db: Knex, systemId: string, dataKey: Buffer, audit: SystemAuditInput, findings: SystemAuditFinding[]): Promise<SystemAuditReportFinding[]> {
  const print = fingerprinter(dataKey, audit);
  const rows = await db('audit_acknowledgements').where({ key_system_id: systemId }).select<{ fingerprint: string; note: string; acknowledged_by_name: string; acknowledged_at: Date }[]>('fingerprint', 'note', 'acknowledged_by_name', 'acknowledged_at');
  const byPrint = new Map(rows.map((r) => [r.fingerprint, { note: r.note, by: r.acknowledged_by_name, at: r.acknowledged_at.toISOString() }]));
  return findings.map((f) => {
    const fingerprint = print(f);
    return { ...f, fingerprint, acknowledged: byPrint.get(fingerprint) ?? null };
  });
}

export async function acknowledge(
  db: Knex,
  input: { systemId: string; finding: SystemAuditReportFinding; note: string; user: { id: string; name: string } },
): Promise<Acknowledgement> {
  const [row] = await db('audit_acknowledgements')
    .insert({ key_system_id: input.systemId, code: input.finding.code, fingerprint: input.finding.fingerprint, note: input.note, acknowledged_by: input.user.id, acknowledged_by_name: input.user.name })
    .onConflict(['key_system_id', 'fingerprint'])
    .merge({ note: input.note, acknowledged_by: input.user.id, acknowledged_by_name: input.user.name, acknowledged_at: db.fn.now() })
    .returning(['note', 'acknowledged_by_name', 'acknowledged_at']);
  return { note: row.note, by: row.acknowledged_by_name, at: new Date(row.acknowledged_at).toISOString() };
}
