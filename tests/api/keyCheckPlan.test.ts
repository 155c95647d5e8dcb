// The Key check plan in a packet: the keys that must not turn a core. The engine's keyOperates
// is the single truth; the plan names a sibling change key and a key of another master, each
// with why (keying-primer bench procedure step 4: "try a key that must not operate").
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { keyOperates } from '../../shared/keying';
import { Packet } from '../../shared/schemas/packet';
import { loadSystem } from '../../server/services/keySystems';
import { techPacket } from './factories';
import { startHarness, type Harness } from './harness';

let h: Harness;
let packet: Packet;
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  packet = Packet.parse((await techPacket(h)).packet);
});
afterAll(async () => h.close());

describe('GET /api/work-orders/:id/packet: must-not-turn keys', () => {
  test('every core gets a sibling change key and a key of another master, each with why', () => {
    // the issue: "a change key of a sibling and, where the system has one, a key of another master"
    for (const core of packet.cores) {
      const none = core.keyCheck.filter((k) => k.role === 'must-not-turn');
      expect(none.map((k) => k.why?.relation), core.tag).toEqual(['sibling', 'other-master']);
      const [sibling, other] = none;
      const change = core.keyCheck.find((k) => k.role === 'change')!;
      expect(sibling!.level).toBe('change');
      expect(sibling!.why!.ownMaster).toBeTruthy();
      expect(change.symbol.startsWith(sibling!.why!.ownMaster!), 'the demo names change keys after their master').toBe(true);
      expect(sibling!.symbol.startsWith(sibling!.why!.ownMaster!)).toBe(true);
      expect(other!.level).toBe('master');
      expect(other!.why!.otherMaster).toBe(other!.symbol);
      expect(other!.why!.otherMaster).not.toBe(sibling!.why!.ownMaster);
      // never a key the core is pinned for
      expect(core.keyCheck.filter((k) => k.expect === 'turns').map((k) => k.symbol)).not.toContain(sibling!.symbol);
    }
  });

  test('the engine agrees, by brute force over the stored bittings: a must-not-turn key does not turn, every planned key does', async () => {
    // brute force: keyOperates on each key's real bitting against the core's pinning
    const wo = await h.db('work_orders').where({ id: packet.workOrder.id }).first('key_system_id');
    const system = await loadSystem(h.db, h.sealer, wo.key_system_id);
    const bitting = new Map(system.keys.map((k) => [k.symbol, k.bitting]));
    for (const core of packet.cores) {
      for (const item of core.keyCheck.filter((k) => k.role !== 'control')) {
        const turns = keyOperates(core.pinning, system.profile, bitting.get(item.symbol)!).plug;
        expect(turns, `${core.tag} ${item.symbol}`).toBe(item.expect === 'turns');
      }
    }
  });

  test('the packet stays version 1 and still parses without the new field (older stored sessions)', () => {
    // compatibility: the field is optional, so a plan saved before it still parses
    expect(packet.v).toBe(1);
    const old = { ...packet, cores: packet.cores.map((c) => ({ ...c, keyCheck: c.keyCheck.map(({ why: _why, ...k }) => k) })) };
    expect(Packet.safeParse(old).success).toBe(true);
  });
});
