import { Router } from 'express';
import { z } from 'zod';
import { Id } from '../../shared/schemas/common';
import { WorkOrderDoorsAdd, WorkOrderInput, WorkOrderUpdate } from '../../shared/schemas/records';
import type { Ctx } from '../context';
import { badRequest, forbidden } from '../errors';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { mails } from '../services/mail';
import { addDoors, buildPacket, createWorkOrder, getWorkOrder, iso, pinningFor, removeCore, updateWorkOrder, workOrderQuery } from '../services/workOrders';
import { chainOf, loadSystem } from '../services/keySystems';

const ListQuery = z.strictObject({
  mine: z.enum(['0', '1']).optional(),
  status: z.enum(['draft', 'assigned', 'in-progress', 'done', 'cancelled', 'open']).optional(),
});

export function workOrdersRouter({ db, sealer, mailer, config }: Ctx): Router {
  const r = Router();

  async function notifyAssignee(wo: Awaited<ReturnType<typeof getWorkOrder>>, userId: string): Promise<void> {
    const user = await db('users').where({ id: userId }).first('email');
    if (user) await mailer.send({ to: user.email, ...mails.workOrderAssigned({ number: wo.number, title: wo.title, cores: wo.coreCount, due: wo.dueDate, link: `${config.publicUrl}/bench` }) });
  }

  r.get('/work-orders', allow('technician', 'supervisor', 'admin'), async (req, res) => {
    const q = parse(ListQuery, req.query, 'The filter');
    const user = req.user!;
    // A technician only ever sees their own work orders.
    const mine = q.mine === '1' || user.role === 'technician';
    const query = workOrderQuery(db).orderBy([{ column: 'w.due_date', order: 'asc', nulls: 'last' }, { column: 'w.number', order: 'desc' }]);
    if (mine) query.where('w.assignee_id', user.id).whereNotIn('w.status', ['draft', 'cancelled']);
    if (q.status === 'open') query.whereNotIn('w.status', ['done', 'cancelled']);
    else if (q.status) query.where('w.status', q.status);
    res.json({ workOrders: (await query).map(iso) });
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
    const cores = await db('work_order_cores as x')
      .join('cores as c', 'c.id', 'x.core_id')
      .leftJoin('doors as d', 'd.id', 'c.door_id')
      .where('x.work_order_id', id)
      .orderBy('x.position')
      .leftJoin('doors as pd', 'pd.id', 'c.planned_door_id')
      // doorId/doorLabel: where the core IS; plannedDoorLabel: where it was planned; doorMismatch: an install elsewhere not yet reviewed (T4).
      .select(
        'c.id',
        'c.tag',
        'c.state',
        'd.id as doorId',
        'd.label as doorLabel',
        'd.fire_rated as fireRated',
        'pd.label as plannedDoorLabel',
        db.raw(`exists(select 1 from installs i where i.core_id = c.id and i.door_mismatch and i.reviewed_at is null) as "doorMismatch"`),
        // The key symbol stamped on the core: its change key (the lowest level not cross-keyed), and a cross-keyed one.
        db.raw(`(select k.symbol from core_keys ck join keys k on k.id = ck.key_id where ck.core_id = c.id and not ck.cross_keyed order by array_position(array['change','master','gm','ggm']::text[], k.level::text) limit 1) as "keySymbol"`),
        db.raw(`(select k.symbol from core_keys ck join keys k on k.id = ck.key_id where ck.core_id = c.id and ck.cross_keyed limit 1) as "crossKeySymbol"`),
      );
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
    const system = await loadSystem(db, sealer, input.keySystemId);
    const chain = chainOf(system.keys, input.keyId);
    if (!chain.length) throw badRequest('That key is not in this key system.', [{ field: 'keyId', message: 'not in this key system' }]);
    if (input.crossKeyId) {
      const cross = system.keys.find((k) => k.id === input.crossKeyId);
      if (!cross) throw badRequest('The cross-keyed key is not in this key system.', [{ field: 'crossKeyId', message: 'not in this key system' }]);
      if (!chain.some((k) => k.id === cross.id)) chain.push({ ...cross, crossKeyed: true });
    }
    const pinning = pinningFor(system, chain);
    res.json({ issues: pinning.issues, openingsCount: pinning.openingsCount, controlOpeningsCount: pinning.controlOpeningsCount, chain: chain.map((k) => k.symbol) });
  });
  return r;
}
