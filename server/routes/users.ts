import { Router } from 'express';
import { InviteRequest, UserUpdate } from '../../shared/schemas/auth';
import { Id } from '../../shared/schemas/common';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { mails } from '../services/mail';
import { inviteUser, listTechnicians, listUsers, resendInvitation, updateUser } from '../services/users';

export function usersRouter({ db, mailer, config }: Ctx): Router {
  const r = Router();
  r.get('/users', allow('admin'), async (_req, res) => res.json({ users: await listUsers(db) }));
  /** Active technicians, for assigning work orders. */
  r.get('/technicians', allow('supervisor', 'admin'), async (_req, res) => {
    res.json({ technicians: await listTechnicians(db) });
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
  r.post('/users/:id/invitation', allow('admin'), async (req, res) => {
    const id = parse(Id, req.params.id, 'The user id');
    const { email, name, token } = await db.transaction(async (trx) => {
      const invitation = await resendInvitation(trx, id, req.user!.id);
      await audit(trx, actorOf(req), 'user.invitation-resent', { type: 'user', id });
      return invitation;
    });
    await mailer.send({ to: email, ...mails.invitation(name, `${config.publicUrl}/set-password?token=${token}`, req.user!.name) });
    res.status(201).json({ user: (await listUsers(db, id))[0] });
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
  return r;
}
