/** Appends to the audit trail: who did what to which record, when and from where. */
import type { Knex } from 'knex';

export interface Actor {
  id: string | null;
  email: string | null;
  ip?: string | undefined;
  userAgent?: string | undefined;
}

export async function audit(
  db: Knex,
  actor: Actor,
  action: string,
  target?: { type: string; id: string } | null,
  details: Record<string, unknown> = {},
): Promise<void> {
  await db('audit_events').insert({
    actor_id: actor.id,
    actor_email: actor.email,
    action,
    target_type: target?.type ?? null,
    target_id: target?.id ?? null,
    ip: actor.ip?.slice(0, 64) ?? null,
    user_agent: actor.userAgent?.slice(0, 300) ?? null,
    details: JSON.stringify(details),
  });
}

/**
 * For side writes that must never change the answer (a lockout, a refused request): a failure
 * is logged and swallowed, never left as an unhandled rejection that would stop the process.
 */
export async function auditQuietly(db: Knex, actor: Actor, action: string, target?: { type: string; id: string } | null, details: Record<string, unknown> = {}): Promise<void> {
  try {
    await audit(db, actor, action, target, details);
  } catch (err) {
    console.error(`[audit] could not record ${action}:`, (err as Error).message);
  }
}
