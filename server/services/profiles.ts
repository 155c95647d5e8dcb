/** Profiles: the built-in ones from the engine, and custom ones an admin keeps in the database. */
import type { Knex } from 'knex';
import { builtInProfiles } from '../../shared/keying';
import type { Profile, ProfileRow } from '../../shared/schemas/profiles';
import { badRequest, conflict, notFound } from '../errors';

export async function listProfiles(db: Knex): Promise<ProfileRow[]> {
  const custom = await db('profiles').orderBy('label').select('definition');
  return [
    ...Object.values(builtInProfiles).map((p) => ({ ...p, builtIn: true })),
    ...custom.map((r: { definition: Profile }) => ({ ...r.definition, builtIn: false })),
  ];
}

export async function getProfile(db: Knex, id: string): Promise<Profile> {
  const builtIn = builtInProfiles[id];
  if (builtIn) return builtIn;
  const row = await db('profiles').where({ id }).first('definition');
  if (!row) throw notFound(`Profile "${id}"`);
  return row.definition as Profile;
}

/** `profile` is parsed with the `Profile` schema, which runs validateProfile. */
export async function createProfile(db: Knex, profile: Profile): Promise<ProfileRow> {
  if (builtInProfiles[profile.id] || (await db('profiles').where({ id: profile.id }).first('id'))) {
    throw conflict(`A profile with the id "${profile.id}" exists already; choose another id.`, [{ field: 'id', message: 'already used' }]);
  }
  await db('profiles').insert({ id: profile.id, label: profile.label, definition: JSON.stringify(profile) });
  return { ...profile, builtIn: false };
}

export async function updateProfile(db: Knex, id: string, profile: Profile): Promise<ProfileRow> {
  if (builtInProfiles[id]) throw badRequest('Built-in profiles cannot be changed; make a custom profile from it instead.');
  if (profile.id !== id) throw badRequest('The id of a profile cannot change.', [{ field: 'id', message: `must stay "${id}"` }]);
  const inUse = await db('key_systems').where({ profile_id: id }).first('id');
  if (inUse) {
    const old = await getProfile(db, id);
    if (old.chambers !== profile.chambers || old.stackUnits !== profile.stackUnits || old.sleeveUnits !== profile.sleeveUnits) {
      throw conflict('Key systems use this profile: its chambers, stack and sleeve cannot change. Make a new profile instead.');
    }
  }
  const n = await db('profiles').where({ id }).update({ label: profile.label, definition: JSON.stringify(profile), updated_at: db.fn.now() });
  if (!n) throw notFound(`Profile "${id}"`);
  return { ...profile, builtIn: false };
}
