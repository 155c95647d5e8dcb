import express, { Router } from 'express';
import { SyncRequest } from '../../shared/schemas/sync';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit, auditQuietly } from '../services/auditTrail';
import { recordSyncQuietly, touchDevice } from '../services/devices';
import { landBatch } from '../services/sync';
import { sendPending } from '../services/notifier';

export function syncRouter(ctx: Ctx): Router {
  const { db, sealer } = ctx;
  const r = Router();

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
    const { response, events } = await landBatch(db, sealer, user, input.deviceId, input.records);
    // What is still on the tablet after this batch: its outbox count less what just landed.
    const left = input.outbox ? Math.max(0, input.outbox.waiting - response.accepted.length - response.duplicates.length) : response.rejected.length;
    // The records are committed by now: what follows must never turn that into a 500 (T10),
    // and the tablet's replay would only get duplicates. Logged if it fails, never thrown.
    await recordSyncQuietly(db, input.deviceId, left);
    if (response.accepted.length || response.rejected.length) {
      await auditQuietly(db, actorOf(req), 'sync.batch', { type: 'device', id: input.deviceId }, { accepted: response.accepted.length, duplicates: response.duplicates.length, rejected: response.rejected.length });
    }
    for (const rej of response.rejected.filter((x) => x.error.code === 'forbidden')) {
      await auditQuietly(db, actorOf(req), 'access.denied', { type: 'sync-record', id: rej.clientId ?? String(rej.index) });
    }
    res.json(response);
    if (events.length) void sendPending(ctx).catch((err) => console.error('[sync] sending notifications failed', err));
  });
  return r;
}
