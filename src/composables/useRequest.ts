/**
 * One request's loading state, its error in words (and per field) and a retry: the busy / try /
 * catch / finally block every console screen used to write out for itself.
 *
 * `run(task)` resolves with the task's value, or `undefined` when it failed (the words are then in
 * `error`, the server's per-field messages in `fields`). With `latestOnly`, a run that a newer one
 * has overtaken also resolves `undefined`, so a slow old answer never replaces a newer list.
 */
import { computed, ref } from 'vue';
import { fieldErrors, fieldProps, messageOf } from '@/helpers/errors';

export interface RequestOptions {
  /** Only the newest run's answer counts (lists reloaded as filters change). */
  latestOnly?: boolean;
  /** Busy from the start: a page that loads on mount shows its spinner before the first run. */
  busy?: boolean;
  /**
   * The fields a form shows messages beside: when every per-field message is one of them, the
   * banner stays empty rather than saying the same thing twice.
   */
  shownFields?: readonly string[];
}

export function useRequest(options: RequestOptions = {}) {
  const running = ref(options.busy ? 1 : 0);
  const error = ref<string | null>(null);
  const fields = ref<Record<string, string>>({});
  let seq = 0;
  let last: (() => Promise<unknown>) | null = null;
  let primed = !!options.busy;

  function clear(): void {
    error.value = null;
    fields.value = {};
  }

  async function run<T>(task: () => Promise<T>): Promise<T | undefined> {
    const mine = ++seq;
    last = task;
    clear();
    // The busy-from-the-start count belongs to the first run.
    if (primed) primed = false;
    else running.value++;
    try {
      const value = await task();
      return options.latestOnly && mine !== seq ? undefined : value;
    } catch (err) {
      if (options.latestOnly && mine !== seq) return undefined;
      fields.value = fieldErrors(err);
      const named = Object.keys(fields.value);
      const shown = options.shownFields;
      error.value = shown && named.length && named.every((f) => shown.includes(f)) ? null : messageOf(err);
      return undefined;
    } finally {
      running.value--;
    }
  }

  /** Runs the last task again (the "Try again" of a failed load). */
  function retry(): Promise<unknown> {
    return last ? run(last) : Promise.resolve(undefined);
  }

  /** A form field's error props: `v-bind="field('title')"`. */
  const field = (name: string) => fieldProps(fields.value, name);

  return { busy: computed(() => running.value > 0), error, fields, field, run, retry, clear };
}
