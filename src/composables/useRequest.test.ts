import { describe, expect, it } from 'vitest';
import { ApiError } from '@/api/http';
import { useRequest } from './useRequest';

/** A promise the test settles by hand, so it can look at the state while a request is under way. */
function deferred<T>() {
  let resolve!: (v: T) => void;
  let reject!: (e: unknown) => void;
  const promise = new Promise<T>((res, rej) => {
    resolve = res;
    reject = rej;
  });
  return { promise, resolve, reject };
}

const invalid = () => new ApiError('validation', 'Check the title.', 400, [{ field: 'title', message: 'Give the work order a title.' }]);

describe('useRequest: busy, the error in words, per-field messages (common practice)', () => {
  it('is busy only while the task runs and hands back its value', async () => {
    const r = useRequest();
    const d = deferred<number>();
    expect(r.busy.value).toBe(false);
    const p = r.run(() => d.promise);
    expect(r.busy.value).toBe(true);
    d.resolve(7);
    expect(await p).toBe(7);
    expect(r.busy.value).toBe(false);
    expect(r.error.value).toBeNull();
  });

  it("puts the server's message and per-field messages where the form shows them, and resolves undefined", async () => {
    const r = useRequest();
    expect(await r.run(() => Promise.reject(invalid()))).toBeUndefined();
    expect(r.error.value).toBe('Check the title.');
    expect(r.fields.value).toEqual({ title: 'Give the work order a title.' });
    expect(r.busy.value).toBe(false);
  });

  it('says something went wrong for an error that is not the API\'s, never its internals', async () => {
    const r = useRequest();
    await r.run(() => Promise.reject(new TypeError('x is undefined')));
    expect(r.error.value).toBe('Something went wrong unexpectedly; try again.');
    expect(r.fields.value).toEqual({});
  });

  it('clears the last error when the next run starts, so a fixed form shows no stale message', async () => {
    const r = useRequest();
    await r.run(() => Promise.reject(invalid()));
    const d = deferred<string>();
    const p = r.run(() => d.promise);
    expect(r.error.value).toBeNull();
    expect(r.fields.value).toEqual({});
    d.resolve('ok');
    await p;
  });

  it('stays busy until every overlapping run has finished', async () => {
    const r = useRequest();
    const a = deferred<number>();
    const b = deferred<number>();
    const pa = r.run(() => a.promise);
    const pb = r.run(() => b.promise);
    a.resolve(1);
    await pa;
    expect(r.busy.value).toBe(true);
    b.resolve(2);
    await pb;
    expect(r.busy.value).toBe(false);
  });

  it('retry runs the last task again and clears the error when it works', async () => {
    const r = useRequest();
    let calls = 0;
    const task = () => (++calls === 1 ? Promise.reject(new ApiError('network', 'The server could not be reached.', 0)) : Promise.resolve(calls));
    expect(await r.run(task)).toBeUndefined();
    expect(r.error.value).toBe('The server could not be reached.');
    expect(await r.retry()).toBe(2);
    expect(r.error.value).toBeNull();
    expect(calls).toBe(2);
  });

  it('retry before any run does nothing', async () => {
    expect(await useRequest().retry()).toBeUndefined();
  });

  it('busy: true shows the spinner before the first run, and the first run ends it', async () => {
    const r = useRequest({ busy: true });
    expect(r.busy.value).toBe(true);
    await r.run(() => Promise.resolve(1));
    expect(r.busy.value).toBe(false);
    await r.run(() => Promise.resolve(2));
    expect(r.busy.value).toBe(false);
  });

  it('clear removes the message and the per-field messages', async () => {
    const r = useRequest();
    await r.run(() => Promise.reject(invalid()));
    r.clear();
    expect(r.error.value).toBeNull();
    expect(r.fields.value).toEqual({});
  });

  it('shownFields: no banner when every message sits beside a field the form shows', async () => {
    const r = useRequest({ shownFields: ['title', 'notes'] });
    await r.run(() => Promise.reject(invalid()));
    expect(r.fields.value).toEqual({ title: 'Give the work order a title.' });
    expect(r.error.value).toBeNull();
  });

  it('shownFields: the banner speaks when a message names a field the form does not show, or none', async () => {
    const r = useRequest({ shownFields: ['notes'] });
    await r.run(() => Promise.reject(invalid()));
    expect(r.error.value).toBe('Check the title.');
    await r.run(() => Promise.reject(new ApiError('conflict', 'Someone changed this first.', 409)));
    expect(r.error.value).toBe('Someone changed this first.');
  });
});

describe('useRequest latestOnly: an old answer never replaces a newer one (common practice)', () => {
  it('an overtaken run resolves undefined even when it answers last', async () => {
    const r = useRequest({ latestOnly: true });
    const old = deferred<string>();
    const next = deferred<string>();
    const pOld = r.run(() => old.promise);
    const pNext = r.run(() => next.promise);
    next.resolve('page 2');
    expect(await pNext).toBe('page 2');
    old.resolve('page 1');
    expect(await pOld).toBeUndefined();
    expect(r.busy.value).toBe(false);
  });

  it("an overtaken run's failure does not show over the newer answer", async () => {
    const r = useRequest({ latestOnly: true });
    const old = deferred<string>();
    const pOld = r.run(() => old.promise);
    const pNext = r.run(() => Promise.resolve('fresh'));
    expect(await pNext).toBe('fresh');
    old.reject(invalid());
    expect(await pOld).toBeUndefined();
    expect(r.error.value).toBeNull();
  });

  it('without latestOnly both answers come back', async () => {
    const r = useRequest();
    const old = deferred<string>();
    const pOld = r.run(() => old.promise);
    await r.run(() => Promise.resolve('b'));
    old.resolve('a');
    expect(await pOld).toBe('a');
  });
});
