import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import * as bench from './bench';
import { KEY, readOne, useKvStore } from './db';
import { QUOTA_MESSAGE } from './errors';
import * as outbox from './outbox';
import * as packets from './packets';
import { recordFinished } from './recordFinished';
import { completion, packet, progress } from './testing/fixtures';
import { allKeys, misbehavingStore, resetOffline, setUpVault } from './testing/harness';

beforeEach(async () => {
  await resetOffline();
  await setUpVault();
});
afterEach(() => useKvStore(null));

const ids = () => ({ coreId: crypto.randomUUID(), workOrderId: crypto.randomUUID() });

describe('recordFinished (S10)', () => {
  it('writes the Bench progress and the outbox entry together', async () => {
    // reliability.md S10
    const { coreId, workOrderId } = ids();
    const record = completion({ coreId, workOrderId });
    expect(await recordFinished({ coreId, progress: { ...progress(coreId, workOrderId), finished: true } }, record)).toEqual({
      saved: [KEY.bench(coreId), KEY.outbox(record.clientId)],
      failed: [],
    });
    expect(await bench.getProgress(coreId)).toMatchObject({ finished: true });
    expect((await outbox.list()).map((e) => e.record)).toEqual([record]);
  });

  it.each([
    ['the second put throws', 'throw'],
    ['the tab dies after the first put', 'abort'],
  ] as const)('writes neither when %s', async (_name, how) => {
    // reliability.md S10; IndexedDB 3.0 (a transaction commits all of its requests or none)
    const { coreId, workOrderId } = ids();
    await bench.saveProgress(coreId, { ...progress(coreId, workOrderId), step: 1 });
    const before = await allKeys();
    // The outbox entry is the first put, the progress the second: either half alone would be a lie.
    useKvStore(misbehavingStore(how === 'throw' ? 2 : 1, how));
    const result = await recordFinished({ coreId, progress: { ...progress(coreId, workOrderId), step: 9 } }, completion({ coreId, workOrderId }));
    useKvStore(null);
    expect(result.saved).toEqual([]);
    expect(result.failed).toHaveLength(2);
    expect(await allKeys()).toEqual(before);
    expect(await bench.getProgress(coreId)).toMatchObject({ step: 1 });
    expect(await outbox.count()).toEqual({ waiting: 0, flagged: 0 });
  });
});

describe('a full disk (S11)', () => {
  it('answers a quota error with a clear message and loses nothing already saved', async () => {
    // reliability.md S11; MDN "Storage quotas and eviction criteria" (QuotaExceededError)
    const p = packet();
    await packets.save(p);
    const first = completion();
    await recordFinished({ coreId: first.coreId, progress: null }, first);
    const before = (await allKeys()).sort();

    useKvStore(misbehavingStore(1, 'throw'));
    const second = completion();
    const result = await recordFinished({ coreId: second.coreId, progress: progress(second.coreId, p.workOrder.id) }, second);
    const packetResult = await packets.save(packet());
    useKvStore(null);

    expect(result.saved).toEqual([]);
    expect(result.failed.every((f) => f.reason === 'quota' && f.message === QUOTA_MESSAGE)).toBe(true);
    expect(QUOTA_MESSAGE).toMatch(/storage is full/);
    expect(QUOTA_MESSAGE).toMatch(/Nothing already saved was lost/);
    expect(packetResult.failed[0]?.reason).toBe('quota');
    expect((await allKeys()).sort()).toEqual(before);
    expect((await outbox.list()).map((e) => e.clientId)).toEqual([first.clientId]);
    expect(await packets.get(p.workOrder.id)).toEqual(p);
    // Once space is back, the same call succeeds: the caller kept what failed.
    expect((await recordFinished({ coreId: second.coreId, progress: null }, second)).failed).toEqual([]);
    expect(await readOne(KEY.outbox(second.clientId))).toBeDefined();
  });
});
