/** Profiles: the built-in ones and the custom ones an admin keeps. */
import { z } from 'zod';
import { ProfileInput } from '@shared/schemas/records';
import { request } from './http';

export const ProfileRow = z.object({ ...ProfileInput.shape, builtIn: z.boolean().optional() });
export type ProfileRow = z.infer<typeof ProfileRow>;

export const listProfiles = async () => (await request('GET', '/api/profiles', { schema: z.object({ profiles: z.array(ProfileRow) }) })).profiles;
export const createProfile = async (input: ProfileInput) => (await request('POST', '/api/profiles', { body: input, schema: z.object({ profile: ProfileRow }) })).profile;
export const updateProfile = async (id: string, input: ProfileInput) =>
  (await request('PUT', `/api/profiles/${encodeURIComponent(id)}`, { body: input, schema: z.object({ profile: ProfileRow }) })).profile;
