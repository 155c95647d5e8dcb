import { stringify } from 'csv-stringify';
import { Router } from 'express';
import { InviteRequest, UserUpdate } from '../../shared/schemas/auth';
import { AuditQuery } from '../../shared/schemas/audit';
import { Id } from '../../shared/schemas/common';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/audit';
import { mails } from '../services/mail';
import { auditColumns, auditQuery, readable } from '../services/auditLog';
import { inviteUser, listUsers, resendInvitation, updateUser } from '../services/users';

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
  r.get('/audit-events', allow('admin'), async (req, res) => {
    const q = parse(AuditQuery, req.query, 'The filter');
    const base = auditQuery(db, q);
    const { total } = ((await base.clone().count({ total: '*' })) as { total: number }[])[0]!;
    const rows = await base
      .orderBy('e.id', 'desc')
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize)
      .select(auditColumns);
    res.json({ rows: await readable(db, rows), total: Number(total), page: q.page, pageSize: q.pageSize });
  });
  /** The filtered log as CSV (at most 50,000 rows); the export is itself an audited event. */
  r.get('/audit-events.csv', allow('admin'), async (req, res) => {
    const { page: _p, pageSize: _s, ...q } = parse(AuditQuery, req.query, 'The filter');
    await audit(db, actorOf(req), 'audit.exported', null, { filter: { action: q.action, person: q.actorId, from: q.from, to: q.to } });
    res.set('Content-Type', 'text/csv; charset=utf-8');
    res.set('Content-Disposition', `attachment; filename="audit-log-${new Date().toISOString().slice(0, 10)}.csv"`);
    const columns = ['at', 'actorName', 'actionName', 'target', 'summary', 'ip', 'action', 'id'];
    // RFC 4180: CRLF between records.
    const csv = stringify({ header: true, columns, record_delimiter: 'windows' });
    csv.pipe(res);
    const base = auditQuery(db, q).orderBy('e.id', 'desc').select(auditColumns);
    for (let offset = 0; offset < 50_000; offset += 1000) {
      const rows = await base.clone().limit(1000).offset(offset);
      for (const row of await readable(db, rows)) {
        // A cell starting with = + - @ would run as a formula in a spreadsheet: prefix it.
        const safe = Object.fromEntries(Object.entries(row).map(([k, v]) => [k, typeof v === 'string' && /^[=+\-@\t\r]/.test(v) ? `'${v}` : v]));
        if (!csv.write(safe)) await new Promise((resolve) => csv.once('drain', resolve));
      }
      if (rows.length < 1000) break;
    }
    csv.end();
  });
  return r;
}
