import { computed, ref } from 'vue';

/**
 * The state of a holder's acknowledgement (AcknowledgementFields.vue) and the request body's part:
 * signed on the screen or typed and ticked. `missing` says what the holder must still do.
 */
export type Acknowledgement = ReturnType<typeof useAcknowledgement>;

export function useAcknowledgement() {
  const mode = ref<'draw' | 'typed'>('draw');
  const name = ref('');
  const signature = ref<string | null>(null);
  const accepted = ref(false);
  const missing = computed(() => (mode.value === 'draw' && !signature.value ? 'The holder signs in the box first, or choose "Type the name and tick".' : null));
  /** Sent as ticked or not: the server names the tick when it is missing. */
  const body = () => ({ name: name.value.trim(), accepted: accepted.value as true, ...(mode.value === 'draw' && signature.value ? { signature: signature.value } : {}) });
  function reset(who = ''): void {
    mode.value = 'draw';
    name.value = who;
    signature.value = null;
    accepted.value = false;
  }
  return { mode, name, signature, accepted, missing, body, reset };
}
