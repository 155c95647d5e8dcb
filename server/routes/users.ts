import { Router } from 'express';
import { z } from 'zod';
import { InviteRequest, UserUpdate } from '../../shared/schemas/auth';
import { Id, IsoDate, Text, TzOffset } from '../../shared/schemas/common';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/audit';
import { mails } from '../services/mail';
import { whereDays } from '../services/dates';
import { inviteUser, listUsers, updateUser } from '../services/users';

const AuditQuery = z.strictObject({
  action: Text(60, 'action').optional(),
  actorId: Id.optional(),
  targetId: Text(80, 'targetId').optional(),
  from: IsoDate.optional(),
  to: IsoDate.optional(),
  tz: TzOffset,
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});

export function usersRouter({ db, mailer, config }: Ctx): Router {
  const r = Router();
  r.get('/users', allow('admin'), async (_req, res) => res.json({ users: await listUsers(db) }));
  /** Active technicians, for assigning work orders. */
  r.get('/technicians', allow('supervisor', 'admin'), async (_req, res) => {
    res.json({ technicians: await db('users').where({ active: true }).whereIn('role', ['technician', 'supervisor']).orderBy('name').select('id', 'name', 'email', 'role') });
  });
  r.post('/users', allow('admin'), async (req, res) => {
    const input = parse(InviteRequest, req.body, 'The invitation');
    const { userId, token } = await db.transaction(async (trx) => {
      const invited = await inviteUser(trx, input, req.user!.id);
      await audit(trx, actorOf(req), 'user.invited', { type: 'user', id: invited.userId }, { role: input.role });
      return invited;
    });
    await mailer.send({ to: input.email, ...mails.invitation(input.name, `${config.publicUrl}/set-password?token=${token}`, req.user!.name) });
    res.status(201).json({ user: (await listUsers(db, userId))[0] });
  });
  r.patch('/users/:id', allow('admin'), async (req, res) => {
    const id = parse(Id, req.params.id, 'The user id');
    const input = parse(UserUpdate, req.body, 'The user');
    await db.transaction(async (trx) => {
      await updateUser(trx, id, input, req.user!.id);
      await audit(trx, actorOf(req), input.active === false ? 'user.deactivated' : input.role ? 'user.role-changed' : 'user.updated', { type: 'user', id }, { ...input });
    });
    res.json({ user: (await listUsers(db, id))[0] });
  });
  r.get('/audit-events', allow('admin'), async (req, res) => {
    const q = parse(AuditQuery, req.query, 'The filter');
    const base = db('audit_events');
    if (q.action) base.where('action', 'like', `${q.action.replace(/[%_\\]/g, (c) => `\\${c}`)}%`);
    if (q.actorId) base.where('actor_id', q.actorId);
    if (q.targetId) base.where('target_id', q.targetId);
    whereDays(db, base, 'at', q);
    const { total } = ((await base.clone().count({ total: '*' })) as { total: number }[])[0]!;
    const rows = await base
      .orderBy('id', 'desc')
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize)
      .select('id', 'at', 'actor_id as actorId', 'actor_email as actorEmail', 'action', 'target_type as targetType', 'target_id as targetId', 'ip', 'details');
    res.json({ rows, total: Number(total), page: q.page, pageSize: q.pageSize });
  });
  return r;
}
