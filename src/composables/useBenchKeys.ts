/**
 * Wires a Bench card to the window's keys while it is shown and `enabled()` says so.
 * Beside the cards (not in src/composables) because only they use it.
 */
import { watchEffect } from 'vue';
import { listenForKeys, type KeyPress } from '@/bench/keys';

export function useBenchKeys<A extends string>(map: (press: KeyPress) => A | null, act: (action: A) => void, enabled: () => boolean): void {
  watchEffect((onCleanup) => {
    if (!enabled()) return;
    onCleanup(listenForKeys(map, act));
  });
}
