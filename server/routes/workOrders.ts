import { Router } from 'express';
import { z } from 'zod';
import { Id } from '../../shared/schemas/common';
import { WorkOrderDoorsAdd, WorkOrderInput, WorkOrderUpdate } from '../../shared/schemas/records';
import type { Ctx } from '../context';
import { forbidden } from '../errors';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { mails } from '../services/mail';
import { previewPinning } from '../services/pinningPreview';
import { emailOf } from '../services/users';
import { listWorkOrders, workOrderCores } from '../services/workOrderLists';
import { addDoors, buildPacket, createWorkOrder, getWorkOrder, removeCore, updateWorkOrder } from '../services/workOrders';

const ListQuery = z.strictObject({
  mine: z.enum(['0', '1']).optional(),
  status: z.enum(['draft', 'assigned', 'in-progress', 'done', 'cancelled', 'open']).optional(),
});

export function workOrdersRouter({ db, sealer, mailer, config }: Ctx): Router {
  const r = Router();

  async function notifyAssignee(wo: Awaited<ReturnType<typeof getWorkOrder>>, userId: string): Promise<void> {
    const user = await emailOf(db, userId);
    if (user) await mailer.send({ to: user.email, ...mails.workOrderAssigned({ number: wo.number, title: wo.title, cores: wo.coreCount, due: wo.dueDate, link: `${config.publicUrl}/bench` }) });
  }

  r.get('/work-orders', allow('technician', 'supervisor', 'admin'), async (req, res) => {
    const q = parse(ListQuery, req.query, 'The filter');
    const user = req.user!;
    // A technician only ever sees their own work orders.
    const mine = q.mine === '1' || user.role === 'technician';
    res.json({ workOrders: await listWorkOrders(db, { assigneeId: mine ? user.id : undefined, status: q.status }) });
  });

  r.post('/work-orders', allow('supervisor', 'admin'), async (req, res) => {
    const input = parse(WorkOrderInput, req.body, 'The work order');
    const created = await db.transaction(async (trx) => {
      const made = await createWorkOrder(trx, sealer, input, req.user!.id);
      await audit(trx, actorOf(req), 'work-order.created', { type: 'work-order', id: made.id }, { cores: made.cores, assigneeId: input.assigneeId ?? null });
      return made;
    });
    const workOrder = await getWorkOrder(db, created.id);
    if (input.assigneeId) await notifyAssignee(workOrder, input.assigneeId);
    res.status(201).json({ workOrder });
  });

  async function readable(id: string, user: { id: string; role: string }) {
    const wo = await getWorkOrder(db, id);
    if (user.role === 'technician' && wo.assigneeId !== user.id) return null;
    return wo;
  }

  r.get('/work-orders/:id', allow('technician', 'supervisor', 'admin'), async (req, res) => {
    const id = parse(Id, req.params.id, 'The work order id');
    const wo = await readable(id, req.user!);
    if (!wo) {
      await audit(db, actorOf(req), 'access.denied', { type: 'work-order', id });
      throw forbidden('This work order is not assigned to you.');
    }
    const cores = await workOrderCores(db, id);
    res.json({ workOrder: wo, cores });
  });

  r.patch('/work-orders/:id', allow('supervisor', 'admin'), async (req, res) => {
    const id = parse(Id, req.params.id, 'The work order id');
    const input = parse(WorkOrderUpdate, req.body, 'The work order');
    const { assignedTo } = await db.transaction(async (trx) => {
      const outcome = await updateWorkOrder(trx, id, input);
      if (input.status === 'cancelled') await audit(trx, actorOf(req), 'work-order.cancelled', { type: 'work-order', id }, { released: outcome.released });
      else await audit(trx, actorOf(req), 'work-order.updated', { type: 'work-order', id }, { fields: Object.keys(input), assigneeId: outcome.assignedTo });
      return outcome;
    });
    const workOrder = await getWorkOrder(db, id);
    if (assignedTo) await notifyAssignee(workOrder, assignedTo);
    res.json({ workOrder });
  });

  /** Adds doors before work starts; their charts are computed like a new order's and refused on any error. */
  r.post('/work-orders/:id/doors', allow('supervisor', 'admin'), async (req, res) => {
    const id = parse(Id, req.params.id, 'The work order id');
    const { doors } = parse(WorkOrderDoorsAdd, req.body, 'The doors');
    // The audit row commits with the write, so a committed change never answers 500.
    const tags = await db.transaction(async (trx) => {
      const added = await addDoors(trx, sealer, id, doors);
      await audit(trx, actorOf(req), 'work-order.doors-added', { type: 'work-order', id }, { cores: added });
      return added;
    });
    res.status(201).json({ workOrder: await getWorkOrder(db, id), tags });
  });
  r.delete('/work-orders/:id/cores/:coreId', allow('supervisor', 'admin'), async (req, res) => {
    const id = parse(Id, req.params.id, 'The work order id');
    const coreId = parse(Id, req.params.coreId, 'The core id');
    await db.transaction(async (trx) => {
      const removed = await removeCore(trx, id, coreId);
      await audit(trx, actorOf(req), 'work-order.door-removed', { type: 'work-order', id }, { core: removed.tag, door: removed.doorLabel });
    });
    res.json({ workOrder: await getWorkOrder(db, id) });
  });

  r.get('/work-orders/:id/packet', allow('technician', 'supervisor', 'admin'), async (req, res) => {
    const id = parse(Id, req.params.id, 'The work order id');
    const wo = await readable(id, req.user!);
    if (!wo) {
      await audit(db, actorOf(req), 'access.denied', { type: 'work-order-packet', id });
      throw forbidden('This work order is not assigned to you; its packet stays with the assignee.');
    }
    // Bittings travel only to a tablet the server knows the session by, so revoking it stops them (T7).
    if (!req.user!.deviceId) {
      await audit(db, actorOf(req), 'access.denied', { type: 'work-order-packet', id }, { reason: 'no-device' });
      throw forbidden('Packets go only to a tablet: sign in on the Bench tablet (this sign-in names no device).');
    }
    const packet = await buildPacket(db, sealer, id);
    await audit(db, actorOf(req), 'packet.downloaded', { type: 'work-order', id }, { cores: packet.cores.length, deviceId: req.user!.deviceId });
    res.json({ packet });
  });

  /** Pinning charts for printing (supervisors). Charts show depths: the read is audited. */
  r.get('/work-orders/:id/charts', allow('supervisor', 'admin'), async (req, res) => {
    const id = parse(Id, req.params.id, 'The work order id');
    const packet = await buildPacket(db, sealer, id);
    await audit(db, actorOf(req), 'bittings.viewed', { type: 'work-order', id }, { what: 'charts' });
    res.json({ packet });
  });

  /** Pinning preview for a door and key before a work order is saved. */
  r.post('/pinning-preview', allow('supervisor', 'admin'), async (req, res) => {
    const input = parse(z.strictObject({ keySystemId: Id, keyId: Id, crossKeyId: Id.nullable().optional() }), req.body, 'The preview');
    res.json(await previewPinning(db, sealer, input));
  });
  return r;
}
