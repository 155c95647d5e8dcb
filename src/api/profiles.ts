/** Profiles: the built-in ones and the custom ones an admin keeps. */
import { ProfileAnswer, ProfileList } from '@shared/schemas/profiles';
import type { ProfileInput } from '@shared/schemas/records';
import { request } from './http';

export type { ProfileRow } from '@shared/schemas/profiles';

export const listProfiles = async () => (await request('GET', '/api/profiles', { schema: ProfileList })).profiles;
export const createProfile = async (input: ProfileInput) => (await request('POST', '/api/profiles', { body: input, schema: ProfileAnswer })).profile;
export const updateProfile = async (id: string, input: ProfileInput) =>
  (await request('PUT', `/api/profiles/${encodeURIComponent(id)}`, { body: input, schema: ProfileAnswer })).profile;
