/** Profiles: the built-in ones and the custom ones an admin keeps. */
import { ProfileAnswer, ProfileList, type Profile } from '@shared/schemas/profiles';
import { request } from './http';

export type { ProfileRow } from '@shared/schemas/profiles';

export const listProfiles = async () => (await request('GET', '/api/profiles', { schema: ProfileList })).profiles;
export const createProfile = async (input: Profile) => (await request('POST', '/api/profiles', { body: input, schema: ProfileAnswer })).profile;
export const updateProfile = async (id: string, input: Profile) =>
  (await request('PUT', `/api/profiles/${encodeURIComponent(id)}`, { body: input, schema: ProfileAnswer })).profile;
