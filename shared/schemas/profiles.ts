/** A profile as the API answers it: the built-in ones and custom ones an admin keeps (builtIn says which). */
import { z } from 'zod';
import { ProfileInput } from './records';

export const ProfileRow = z.object({ ...ProfileInput.shape, builtIn: z.boolean() });
export type ProfileRow = z.infer<typeof ProfileRow>;
export const ProfileList = z.object({ profiles: z.array(ProfileRow) });
export type ProfileList = z.infer<typeof ProfileList>;
export const ProfileAnswer = z.object({ profile: ProfileRow });
export type ProfileAnswer = z.infer<typeof ProfileAnswer>;
