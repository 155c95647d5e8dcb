// Custom profiles through the API: the body is parsed with the one zod `Profile`, which is refined by
// the engine's validateProfile, so the API refuses exactly what the engine would, naming the field
// with the engine's words, and stores nothing (A7 of ../shared/design/reliability.md).
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { builtInProfiles, chamberRange, stepRange, validateProfile, type Profile } from '../../shared/keying';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let admin: string;
beforeAll(async () => {
  h = await startHarness();
  admin = await h.tokenFor('admin');
});
afterAll(async () => h.close());

const good: Profile = { ...builtInProfiles['sfic-6']!, id: 'shop-six', label: 'Shop six-pin (invented)' };
const fieldsOf = (res: { json: { error: { details?: { field?: string }[] } } }) => (res.json.error.details ?? []).map((d) => d.field);

describe('POST /api/profiles: one validator at the limits (boundary values; common practice)', () => {
  test.each<[string, Partial<Profile>, string]>([
    ['one chamber too many', { chambers: chamberRange.max + 1 }, 'chambers'],
    ['one chamber too few', { chambers: chamberRange.min - 1 }, 'chambers'],
    ['a step past 2', { step: stepRange.max + 1 }, 'step'],
    ['a depth past 9 (zod once allowed 15)', { maxDepth: 10, sleeveUnits: 11, stackUnits: 30 }, 'minDepth'],
    ['a wafer size past the chamber', { wafers: [2, 3, 31] }, 'wafers'],
  ])('%s: 400 naming the field in the engine’s words; nothing stored', async (_name, change, field) => {
    const before = await countRows(h.db, 'profiles', 'audit_events');
    const body = { ...good, ...change };
    const res = await h.call('POST', '/api/profiles', { token: admin, body });
    expect(res.status).toBe(400);
    expect(res.json.error.code).toBe('validation');
    expect(fieldsOf(res)).toEqual([field]);
    expect(res.json.error.details[0].message).toBe(validateProfile(body)[0]!.message);
    expect(await countRows(h.db, 'profiles', 'audit_events')).toEqual(before);
  });

  test('the same profile at the edges it may take (8 chambers, step 1) is stored and answered (control)', async () => {
    const res = await h.call('POST', '/api/profiles', { token: admin, body: { ...good, chambers: chamberRange.max, step: stepRange.min } });
    expect(res.status).toBe(201);
    expect(res.json.profile).toMatchObject({ id: 'shop-six', chambers: 8, step: 1, builtIn: false });
  });

  test('PUT refuses a bad change the same way and leaves the stored profile as it was', async () => {
    const res = await h.call('PUT', '/api/profiles/shop-six', { token: admin, body: { ...good, chambers: 8, step: 1, minWaferUnits: 0 } });
    expect(res.status).toBe(400);
    expect(fieldsOf(res)).toEqual(['minWaferUnits']);
    const listed = (await h.call('GET', '/api/profiles', { token: admin })).json.profiles as (Profile & { builtIn: boolean })[];
    expect(listed.find((p) => p.id === 'shop-six')).toMatchObject({ chambers: 8, step: 1, minWaferUnits: good.minWaferUnits });
  });
});
