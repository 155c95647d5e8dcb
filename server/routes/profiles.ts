/** Profiles: the built-in ones and the custom ones an admin keeps (services/profiles.ts). */
import { Router } from 'express';
import { Profile, ProfileId } from '../../shared/schemas/profiles';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { createProfile, listProfiles, updateProfile } from '../services/profiles';

export function profilesRouter({ db }: Ctx): Router {
  const r = Router();
  r.get('/profiles', allow('supervisor', 'admin'), async (_req, res) => res.json({ profiles: await listProfiles(db) }));
  r.post('/profiles', allow('admin'), async (req, res) => {
    const input = parse(Profile, req.body, 'The profile');
    const profile = await db.transaction(async (trx) => {
      const created = await createProfile(trx, input);
      await audit(trx, actorOf(req), 'profile.created', { type: 'profile', id: created.id });
      return created;
    });
    res.status(201).json({ profile });
  });
  r.put('/profiles/:pid', allow('admin'), async (req, res) => {
    const pid = parse(ProfileId, req.params.pid, 'The profile id');
    const input = parse(Profile, req.body, 'The profile');
    const profile = await db.transaction(async (trx) => {
      const updated = await updateProfile(trx, pid, input);
      await audit(trx, actorOf(req), 'profile.updated', { type: 'profile', id: updated.id });
      return updated;
    });
    res.json({ profile });
  });
  return r;
}
