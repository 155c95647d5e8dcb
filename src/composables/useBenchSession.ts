/**
 * Holds one core's Bench session on the tablet. Every move is saved (encrypted), in order,
 * right after the screen moves on: each save holds the whole session, so a save that fails
 * is made good by the next, and a crash costs at most the last part loaded (the Core view
 * shows what is in). The move that finishes the core is different: the completion goes
 * into the outbox in the same transaction as the final state (reliability.md S10), and the
 * screen says "done" only once it is stored.
 */
import { ref, shallowRef } from 'vue';
import type { Packet, PacketCore } from '@shared/schemas/packet';
import * as S from '@/bench/session';
import { deserialise, serialise } from '@/bench/sessionData';
import { benchBlocker } from '@/bench/steps';
import { bench, recordFinished, type WriteResult } from '@/offline';
import { progressOf, type CoreProgress, type CoreStatus } from '@/stores/bench';

/** Resolves after the browser has drawn the next frame (a timer queued from inside requestAnimationFrame). */
function afterPaint(): Promise<void> {
  if (typeof requestAnimationFrame === 'undefined') return Promise.resolve();
  return new Promise((resolve) => requestAnimationFrame(() => setTimeout(resolve, 0)));
}

export function useBenchSession() {
  const session = shallowRef<S.BenchSession | null>(null);
  const progress = ref<CoreProgress | null>(null);
  const blocker = ref<string | null>(null);
  const saveError = ref<string | null>(null);
  let packet: Packet | null = null;
  let core: PacketCore | null = null;
  let saving: Promise<unknown> = Promise.resolve();

  async function open(p: Packet, c: PacketCore): Promise<void> {
    packet = p;
    core = c;
    blocker.value = benchBlocker(c.pinning, p.profile);
    progress.value = await progressOf(c.id);
    if (blocker.value) return;
    session.value = progress.value?.session ? deserialise(progress.value.session) : S.startSession(c, p.profile, new Date());
  }

  function statusFor(s: S.BenchSession): CoreStatus {
    if (s.phase === 'done') return s.result === 'passed' ? 'finished' : 'set-aside';
    return s.phase === 'rebuild' ? 'rebuild' : 'in-progress';
  }

  function failed(result: WriteResult): boolean {
    saveError.value = result.failed[0]?.message ?? null;
    return result.failed.length > 0;
  }

  /** Applies one move; the screen changes only once the move is stored. */
  async function apply(move: (s: S.BenchSession, now: Date) => S.BenchSession): Promise<boolean> {
    const current = session.value;
    if (!current || !packet || !core) return false;
    const nextState = move(current, new Date());
    if (nextState === current) return false;
    const base = { coreId: core.id, workOrderId: packet.workOrder.id, updatedAt: nextState.updatedAt };
    if (nextState.phase === 'done') {
      await saving; // earlier saves first, so the final state is the last one written
      const clientId = crypto.randomUUID();
      const record = S.finish(nextState, { clientId, workOrderId: packet.workOrder.id });
      const next: CoreProgress = { ...base, session: serialise(nextState), status: statusFor(nextState), completionId: clientId };
      if (failed(await recordFinished({ coreId: core.id, progress: next }, record))) return false;
      progress.value = next;
    } else {
      const { session: _old, ...kept } = progress.value ?? {};
      const next = { ...kept, ...base, status: statusFor(nextState) } as CoreProgress;
      progress.value = next;
      session.value = nextState;
      const coreId = core.id;
      // The screen moves first; serialising and sealing the whole session waits for the next frame to be drawn.
      saving = saving.then(afterPaint).then(async () => failed(await bench.saveProgress(coreId, { ...next, session: serialise(nextState) })));
      return true;
    }
    session.value = nextState;
    return true;
  }

  return { session, progress, blocker, saveError, open, apply };
}
