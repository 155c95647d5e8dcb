/**
 * Sends the mail that is owed (rows of `notifications`, written with the work that owes it: synced
 * work, a key due back, a key audit's reminder).
 * Each row is locked while it is sent, so two server processes never send it both. A crash
 * between sending and marking may repeat a mail, never lose one.
 */
import type { Knex } from 'knex';
import type { Config } from '../config';
import { sendReminder } from './keyAudits';
import { mails, type KeyCheckOutcome, type Mailer } from './mail';
import { getWorkOrder } from './workOrders';

export type NotificationKind = 'key-check-failed' | 'work-order-done' | 'key-due' | 'key-audit-reminder';

interface Deps {
  db: Knex;
  mailer: Mailer;
  config: Config;
}

async function supervisorsFor(db: Knex, workOrderId: string | null): Promise<string[]> {
  if (workOrderId) {
    const creator = await db('work_orders as w').join('users as u', 'u.id', 'w.created_by').where('w.id', workOrderId).where('u.active', true).whereIn('u.role', ['supervisor', 'admin']).first('u.email');
    if (creator) return [creator.email];
  }
  return db('users').where({ role: 'supervisor', active: true }).pluck('email');
}

async function deliver({ db, mailer, config }: Deps, kind: NotificationKind, refId: string): Promise<void> {
  if (kind === 'key-due') {
    // Only symbol and copy number: a reminder never carries a bitting.
    const i = await db('key_issues as i').join('key_holders as h', 'h.id', 'i.holder_id').leftJoin('keys as k', 'k.id', 'i.key_id').leftJoin('control_keys as ck', 'ck.id', 'i.control_key_id').where('i.id', refId).first('i.status', 'i.copy_number', db.raw(`to_char(i.due_date, 'YYYY-MM-DD') as due`), 'h.name', 'h.email', db.raw('coalesce(k.symbol, ck.symbol) as symbol'));
    if (i?.status === 'out' && i.email) await mailer.send({ to: i.email, ...mails.keyDue({ holder: i.name, symbol: i.symbol, copy: i.copy_number, due: i.due }) });
    return;
  }
  if (kind === 'key-audit-reminder') {
    // A new link for the holder, with their copies by symbol and copy number only.
    await sendReminder(db, config, mailer, refId);
    return;
  }
  if (kind === 'work-order-done') {
    const wo = await getWorkOrder(db, refId);
    for (const to of await supervisorsFor(db, wo.id)) await mailer.send({ to, ...mails.workOrderFinished({ number: wo.number, title: wo.title, cores: wo.coreCount, link: `${config.publicUrl}/completions?workOrderId=${wo.id}` }) });
    return;
  }
  const c = await db('completions as cp')
    .leftJoin('work_orders as w', 'w.id', 'cp.work_order_id')
    .where('cp.id', refId)
    .first('cp.core_id', 'cp.core_tag', 'cp.door_label', 'cp.technician_name', 'cp.result', 'cp.attempt_count', 'cp.finished_at', 'cp.received_at', 'w.id as woId', 'w.number', 'w.title', 'cp.attempts');
  if (!c) return;
  const notes = (c.attempts as { keyChecks: { result: string; symbol: string; note?: string }[] }[]).flatMap((a) => a.keyChecks.filter((k) => k.result === 'failed').map((k) => `${k.symbol}: ${k.note ?? 'failed'}`));
  const outcome = await outcomeOffline(db, c);
  for (const to of await supervisorsFor(db, c.woId)) {
    await mailer.send({
      to,
      ...mails.keyCheckFailed({ number: c.number, title: c.title, tag: c.core_tag, door: c.door_label, technician: c.technician_name, notes, outcome, link: `${config.publicUrl}/completions?hadFailedCheck=1&coreId=${c.core_id}` }),
    });
  }
}

/**
 * What was true on the tablet when it synced, not when the mail goes out: a core that failed,
 * was rebuilt and passed before the sync (in the same completion, or a later one finished
 * before this one reached the server) is reported as passed, not as waiting for a rebuild.
 */
export async function outcomeOffline(db: Knex, c: { core_id: string; result: string; attempt_count: number; finished_at: Date; received_at: Date }): Promise<KeyCheckOutcome> {
  if (c.result === 'passed') return { kind: 'passed', at: new Date(c.finished_at).toISOString(), attempt: c.attempt_count };
  const later = await db('completions')
    .where({ core_id: c.core_id, result: 'passed' })
    .where('finished_at', '>', c.finished_at)
    .where('finished_at', '<=', c.received_at)
    .orderBy('finished_at')
    .first('finished_at');
  return later ? { kind: 'passed', at: new Date(later.finished_at).toISOString(), attempt: null } : { kind: 'waits' };
}

/** Sends what is owed, one row at a time; returns how many were sent. */
export async function sendPending(deps: Deps, limit = 50): Promise<number> {
  const tried: string[] = [];
  let sent = 0;
  while (tried.length < limit) {
    // The row stays locked while its mail goes out: a process killed mid-send drops its
    // connection, the lock goes with it, and the next server sends the mail.
    const outcome = await deps.db.transaction(async (trx) => {
      const n = await trx('notifications').whereNull('sent_at').where('attempts', '<', 10).whereNotIn('id', tried).orderBy('created_at').forUpdate().skipLocked().first<{ id: string; kind: NotificationKind; ref_id: string } | undefined>('id', 'kind', 'ref_id');
      if (!n) return null;
      tried.push(n.id);
      try {
        // Read through the same transaction: a second connection could queue behind a lock
        // that waits on this one (a TRUNCATE or ALTER), which Postgres cannot see as a deadlock.
        await deliver({ ...deps, db: trx }, n.kind, n.ref_id);
        await trx('notifications').where({ id: n.id }).update({ sent_at: trx.fn.now(), attempts: trx.raw('attempts + 1'), last_error: null });
        return 'sent';
      } catch (err) {
        await trx('notifications').where({ id: n.id }).update({ attempts: trx.raw('attempts + 1'), last_error: (err as Error).message.slice(0, 500) });
        return 'failed';
      }
    });
    if (outcome === null) break;
    if (outcome === 'sent') sent++;
  }
  return sent;
}
