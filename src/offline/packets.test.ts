import { beforeEach, describe, expect, it } from 'vitest';
import * as bench from './bench';
import { KEY, commit, readOne } from './db';
import { onProblem, type Problem } from './errors';
import * as packets from './packets';
import * as vault from './vault';
import { recordFinished } from './recordFinished';
import { MARKERS, completion, packet, progress } from './testing/fixtures';
import { allKeys, rawDump, resetOffline, setUpVault } from './testing/harness';

beforeEach(async () => {
  await resetOffline();
  await setUpVault();
});

describe('packets at rest', () => {
  it('round-trips a packet and lists its summary', async () => {
    // common practice: what is saved reads back unchanged
    const p = packet({ title: 'North stair cores' });
    expect(await packets.save(p)).toEqual({ saved: [KEY.packet(p.workOrder.id)], failed: [] });
    expect(await packets.get(p.workOrder.id)).toEqual(p);
    expect(await packets.list()).toEqual([{ workOrderId: p.workOrder.id, title: 'North stair cores', number: 1042, fetchedAt: p.fetchedAt, expiresAt: p.expiresAt, coreCount: 1 }]);
  });

  it('leaves no bitting-like text in plain sight in IndexedDB', async () => {
    // reliability.md A9; OWASP HTML5 Security Cheat Sheet (local storage); OWASP ASVS 5 14.3.3
    const p = packet();
    const coreId = p.cores[0]!.id;
    await packets.save(p);
    await bench.saveProgress(coreId, progress(coreId, p.workOrder.id));
    await recordFinished({ coreId, progress: null }, completion({ coreId, workOrderId: p.workOrder.id }));
    const dump = await rawDump();
    expect(dump).toContain('packet:'); // the dump really holds the records
    for (const marker of MARKERS) expect(dump).not.toContain(marker);
    expect(dump).not.toContain('East wing rekey');
  });

  it('refuses a packet ciphertext copied onto another work order and reports it', async () => {
    // NIST SP 800-38D (additional authenticated data = the IndexedDB key); the issue: reported, not a crash
    const a = packet();
    const b = packet();
    await packets.save(a);
    await packets.save(b);
    await commit([[KEY.packet(b.workOrder.id), await readOne(KEY.packet(a.workOrder.id))]]);
    const problems: Problem[] = [];
    const stop = onProblem((p) => problems.push(p));
    expect(await packets.get(b.workOrder.id)).toBeNull();
    expect(await packets.get(a.workOrder.id)).toEqual(a);
    expect((await packets.list()).map((s) => s.workOrderId)).toEqual([a.workOrder.id]);
    stop();
    expect(problems[0]).toMatchObject({ key: KEY.packet(b.workOrder.id), kind: 'damaged' });
  });

  it('refuses a tampered packet and reports it', async () => {
    // NIST SP 800-38D 7.2 (tag check); reliability.md A9
    const p = packet();
    await packets.save(p);
    const stored = (await readOne<{ ct: Uint8Array }>(KEY.packet(p.workOrder.id)))!;
    stored.ct[10]! ^= 0xff;
    await commit([[KEY.packet(p.workOrder.id), stored]]);
    const problems: Problem[] = [];
    const stop = onProblem((x) => problems.push(x));
    expect(await packets.get(p.workOrder.id)).toBeNull();
    stop();
    expect(problems).toHaveLength(1);
  });

  it('purges packets after their shift, with their Bench progress, even while locked', async () => {
    // the issue: packets expire after the shift they were fetched for
    const old = packet({ expiresAt: new Date(Date.now() - 60_000).toISOString() });
    const current = packet();
    const oldCore = old.cores[0]!.id;
    await packets.save(old);
    await packets.save(current);
    await bench.saveProgress(oldCore, progress(oldCore, old.workOrder.id));
    vault.lock();
    expect(await packets.purgeExpired()).toEqual([old.workOrder.id]);
    const keys = await allKeys();
    expect(keys).not.toContain(KEY.packet(old.workOrder.id));
    expect(keys).not.toContain(KEY.bench(oldCore));
    expect(keys).toContain(KEY.packet(current.workOrder.id));
  });

  it('treats a packet past its expiry as gone when asked for it', async () => {
    // the issue: packets expire after the shift
    const p = packet({ expiresAt: new Date(Date.now() + 1000).toISOString() });
    await packets.save(p);
    expect(await packets.get(p.workOrder.id, new Date(Date.now() + 2000))).toBeNull();
    expect(await readOne(KEY.packet(p.workOrder.id))).toBeUndefined();
  });

  it('answers a save while locked with a failure, not an exception', async () => {
    // docs/code-style.md: partial failures returned as { saved, failed }
    vault.lock();
    const result = await packets.save(packet());
    expect(result.saved).toEqual([]);
    expect(result.failed[0]).toMatchObject({ reason: 'locked' });
  });
});
