/**
 * A profile: what an admin sends to make or change one, and what the API answers (the built-in
 * ones and the custom ones an admin keeps; builtIn says which). One shape, the engine's
 * `Profile`, and one validator: the fields are typed here and every limit and rule is the
 * engine's validateProfile (shared/keying/limits.ts), so the API and the engine cannot disagree.
 */
import { z } from 'zod';
import { validateProfile, type Profile as EngineProfile } from '../keying';
import { Name } from './common';

export const ProfileId = z.string({ error: 'a profile id is text' }).trim().regex(/^[a-z0-9-]{3,40}$/, { error: 'an id is 3 to 40 lower-case letters, digits and dashes' });

const units = (what: string) => z.number({ error: `${what}: enter a number` });
const sizes = (what: string) => z.array(units(what), { error: `${what}: list the stocked sizes as numbers` });
const fields = {
  id: ProfileId,
  label: Name(120, 'a descriptive name'),
  chambers: units('chambers'),
  minDepth: units('the shallowest depth'),
  maxDepth: units('the deepest depth'),
  stackUnits: units('the stack'),
  sleeveUnits: units('the sleeve'),
  minWaferUnits: units('the thinnest wafer'),
  step: units('the step'),
  maxAdjacentCut: units('the maximum adjacent cut'),
  bottomPins: sizes('bottom pins'),
  wafers: sizes('wafers'),
  topPins: sizes('top pins'),
  chamberOneAt: z.enum(['back', 'front'], { error: 'chamber 1 is at the back or the front' }),
};

/** A profile as written (a create or update body: strict, so an unknown field is refused), checked by validateProfile. */
export const Profile: z.ZodType<EngineProfile> = z.strictObject(fields).superRefine((profile, ctx) => {
  for (const problem of validateProfile(profile)) ctx.addIssue({ code: 'custom', path: [problem.field], message: problem.message });
});
export type Profile = z.infer<typeof Profile>;

export const ProfileRow = z.object({ ...fields, builtIn: z.boolean() });
export type ProfileRow = z.infer<typeof ProfileRow>;
export const ProfileList = z.object({ profiles: z.array(ProfileRow) });
export type ProfileList = z.infer<typeof ProfileList>;
export const ProfileAnswer = z.object({ profile: ProfileRow });
export type ProfileAnswer = z.infer<typeof ProfileAnswer>;
