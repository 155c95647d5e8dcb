// POST /api/key-systems with its top master: the screen's one step (profile, control key, top
// master, name). Cases A5, A7 and A10 of ../shared/design/reliability.md.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { KeySystem } from '../../shared/schemas/records';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let admin: string;
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  admin = await h.tokenFor('admin');
});
afterAll(async () => h.close());

const fieldsOf = (res: { json: { error: { details?: { field?: string }[] } } }) => (res.json.error.details ?? []).map((d) => d.field);

describe('POST /api/key-systems with a top master', () => {
  test('creates the system and its grand master in one step; the bitting is sealed at rest and audited as created (A10)', async () => {
    const res = await h.call('POST', '/api/key-systems', {
      token: admin,
      body: { name: 'Westmarch Annex', profileId: 'sfic-7', control: '7351735', topMaster: { symbol: 'w', level: 'gm', bitting: '2462846' } },
    });
    expect(res.status, res.text).toBe(201);
    const ks = KeySystem.parse(res.json.keySystem);
    expect(ks).toMatchObject({ name: 'Westmarch Annex', keyCount: 1 });
    expect(res.text).not.toContain('2462846');
    const key = await h.db('keys').where({ key_system_id: ks.id }).first();
    expect(key).toMatchObject({ symbol: 'W', level: 'gm', parent_id: null });
    // sealed: the raw column never holds the digits (A10)
    expect(key.bitting_enc).not.toContain('2462846');
    expect(h.sealer.open(key.bitting_enc, `key:${key.id}`)).toBe('2462846');
    const event = await h.db('audit_events').where({ action: 'key-system.created', target_id: ks.id }).first();
    expect(event.details).toEqual({ topMaster: 'W' });
  });

  test.each([
    ['a top master bitting of 6 digits on a 7-chamber profile', { symbol: 'B', level: 'gm', bitting: '246284' }, 'topMaster.bitting'],
    ['a top master that is a change key', { symbol: 'B', level: 'change', bitting: '2462846' }, 'topMaster.level'],
    ['a top master with a space in its symbol', { symbol: 'B 1', level: 'gm', bitting: '2462846' }, 'topMaster.symbol'],
    ['a top master equal to the control key', { symbol: 'B', level: 'gm', bitting: '7351735' }, 'bitting'],
  ])('%s: 400 naming the field, nothing written (A7)', async (_name, topMaster, field) => {
    const before = await countRows(h.db, 'key_systems', 'keys', 'audit_events');
    const res = await h.call('POST', '/api/key-systems', { token: admin, body: { name: 'Refused system', profileId: 'sfic-7', control: '7351735', topMaster } });
    expect(res.status, res.text).toBe(400);
    expect(fieldsOf(res)).toContain(field);
    expect(await countRows(h.db, 'key_systems', 'keys', 'audit_events')).toEqual(before);
  });

  test('an extra field inside the top master is refused (A5: mass assignment)', async () => {
    const res = await h.call('POST', '/api/key-systems', { token: admin, body: { name: 'Extra', profileId: 'sfic-7', control: '7351735', topMaster: { symbol: 'B', level: 'gm', bitting: '2462846', status: 'lost' } } });
    expect(res.status).toBe(400);
    expect(await h.db('key_systems').where({ name: 'Extra' }).first()).toBeUndefined();
  });

  test('without a top master the system starts empty (the top master is optional)', async () => {
    const res = await h.call('POST', '/api/key-systems', { token: admin, body: { name: 'Empty start', profileId: 'sfic-7', control: '7351735' } });
    expect(res.status).toBe(201);
    expect(res.json.keySystem.keyCount).toBe(0);
  });
});
