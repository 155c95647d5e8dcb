import { Router } from 'express';
import { z } from 'zod';
import { Id, Text } from '../../shared/schemas/common';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { listDevices, revokeDevice, touchDevice } from '../services/devices';
import { HttpError } from '../errors';

const Escrow = z.strictObject({ deviceId: Id, label: Text(120, 'the label').optional() });

export function devicesRouter({ db, sealer }: Ctx): Router {
  const r = Router();
  /** The tablet's escrow key: wraps its outbox key so finished work survives a forgotten passphrase. */
  r.post('/devices/escrow', allow('technician', 'supervisor', 'admin'), async (req, res) => {
    const input = parse(Escrow, req.body, 'The device');
    const device = await db.transaction(async (trx) => {
      const touched = await touchDevice(trx, sealer, req.user!.id, input.deviceId, input.label);
      if (!touched.revoked) await audit(trx, actorOf(req), 'device.escrow-fetched', { type: 'device', id: input.deviceId });
      return touched;
    });
    if (device.revoked) throw new HttpError('device-revoked', 'This tablet was revoked by an administrator; it wipes its packets now.');
    res.json({ deviceId: input.deviceId, escrowKey: device.escrowKey });
  });
  r.get('/devices', allow('admin', 'supervisor'), async (_req, res) => res.json({ devices: await listDevices(db) }));
  r.post('/devices/:id/revoke', allow('admin'), async (req, res) => {
    const id = parse(Id, req.params.id, 'The device id');
    await db.transaction(async (trx) => {
      await revokeDevice(trx, id, req.user!.id);
      await audit(trx, actorOf(req), 'device.revoked', { type: 'device', id });
    });
    res.json({ ok: true });
  });
  return r;
}
