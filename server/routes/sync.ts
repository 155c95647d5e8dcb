import express, { Router } from 'express';
import { SyncRequest } from '../../shared/schemas/sync';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/audit';
import { touchDevice } from '../services/devices';
import { mails } from '../services/mail';
import { landBatch, type SyncEvent } from '../services/sync';
import { getWorkOrder } from '../services/workOrders';

export function syncRouter(ctx: Ctx): Router {
  const { db, sealer, mailer, config } = ctx;
  const r = Router();

  async function supervisorsFor(workOrderId: string | null): Promise<string[]> {
    if (workOrderId) {
      const creator = await db('work_orders as w').join('users as u', 'u.id', 'w.created_by').where('w.id', workOrderId).where('u.active', true).whereIn('u.role', ['supervisor', 'admin']).first('u.email');
      if (creator) return [creator.email];
    }
    return db('users').where({ role: 'supervisor', active: true }).pluck('email');
  }

  async function notify(events: SyncEvent[]): Promise<void> {
    for (const e of events) {
      if (e.kind === 'work-order-done') {
        const wo = await getWorkOrder(db, e.workOrderId);
        for (const to of await supervisorsFor(wo.id)) await mailer.send({ to, ...mails.workOrderFinished({ number: wo.number, title: wo.title, cores: wo.coreCount, link: `${config.publicUrl}/completions?workOrderId=${wo.id}` }) });
      } else {
        const c = await db('completions as cp')
          .join('cores as c', 'c.id', 'cp.core_id')
          .join('users as u', 'u.id', 'cp.technician_id')
          .leftJoin('doors as d', 'd.id', 'c.door_id')
          .leftJoin('work_orders as w', 'w.id', 'cp.work_order_id')
          .where('cp.id', e.completionId)
          .first('c.tag', 'd.label', 'u.name', 'w.id as woId', 'w.number', 'w.title', 'cp.attempts');
        const notes = (c.attempts as { keyChecks: { result: string; symbol: string; note?: string }[] }[]).flatMap((a) => a.keyChecks.filter((k) => k.result === 'failed').map((k) => `${k.symbol}: ${k.note ?? 'failed'}`));
        for (const to of await supervisorsFor(c.woId)) {
          await mailer.send({ to, ...mails.keyCheckFailed({ number: c.number, title: c.title, tag: c.tag, door: c.label, technician: c.name, notes, link: `${config.publicUrl}/completions?result=failed` }) });
        }
      }
    }
  }

  // A batch of 100 completions with their steps is larger than other bodies: 2 MB here.
  r.post('/sync', express.json({ limit: '2mb' }), allow('technician', 'supervisor', 'admin'), async (req, res) => {
    const input = parse(SyncRequest, req.body, 'The sync');
    const user = req.user!;
    const device = await touchDevice(db, sealer, user.id, input.deviceId);
    if (device.revoked) {
      await audit(db, actorOf(req), 'sync.refused-revoked', { type: 'device', id: input.deviceId });
      return res.json({
        accepted: [],
        duplicates: [],
        rejected: input.records.map((rec, index) => ({ clientId: (rec as { clientId?: string })?.clientId ?? null, index, error: { code: 'device-revoked', message: 'This tablet was revoked by an administrator.' } })),
        deviceRevoked: true,
      });
    }
    const { response, events } = await landBatch(db, user, input.deviceId, input.records);
    await db('devices').where({ id: input.deviceId }).update({ last_sync_at: db.fn.now(), last_sync_waiting: response.rejected.length });
    if (response.accepted.length || response.rejected.length) {
      await audit(db, actorOf(req), 'sync.batch', { type: 'device', id: input.deviceId }, { accepted: response.accepted.length, duplicates: response.duplicates.length, rejected: response.rejected.length });
    }
    for (const rej of response.rejected.filter((x) => x.error.code === 'forbidden')) {
      await audit(db, actorOf(req), 'access.denied', { type: 'sync-record', id: rej.clientId ?? String(rej.index) });
    }
    res.json(response);
    void notify(events).catch((err) => console.error('[sync] notification failed', err));
  });
  return r;
}
