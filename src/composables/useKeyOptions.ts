/**
 * A key select's options with type-to-filter: the system's active keys, in natural symbol
 * order, each labelled with its level. For a `q-select` with `use-input`:
 * `:options="keyOptions" @filter="filterKeys"`; `KeySelect.vue` is that select.
 */
import { computed, ref, type Ref } from 'vue';
import type { Key } from '@shared/schemas/records';
import { levelNames, naturally } from '@shared/words';

export function useKeyOptions(keys: Ref<Key[]>) {
  const needle = ref('');
  const keyOptions = computed(() =>
    naturally(
      keys.value.filter((k) => k.status === 'active' && k.symbol.toLowerCase().includes(needle.value)),
      (k) => k.symbol,
    ).map((k) => ({ label: `${k.symbol} (${levelNames[k.level]})`, value: k.id })),
  );
  function filterKeys(value: string, update: (fn: () => void) => void): void {
    update(() => (needle.value = value.toLowerCase()));
  }
  return { keyOptions, filterKeys, needle };
}
