/**
 * What the unlock screen says: why the tablet is locked, and exactly what "Forgot the
 * passphrase?" wipes and keeps, from counts the tablet can read while locked.
 */
import type { ProgressSummary } from '@/offline';
import type { LockReason } from '@/stores/vault';

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

export function lockedBecause(reason: LockReason): string {
  if (reason?.kind === 'idle') return `Locked after ${plural(reason.minutes, 'idle minute')}. Bench progress is where you left it.`;
  if (reason?.kind === 'signed-in') return 'You signed in: type the tablet’s passphrase to open the work kept on it.';
  return 'The app was reloaded or restarted, so the tablet’s keys left memory. Bench progress is where you left it.';
}

/** The forgot-passphrase confirmation: what goes, what stays and how it comes back. */
export function forgotMessage(s: ProgressSummary, waiting: number): string[] {
  const lines: string[] = [];
  lines.push(s.packets ? `Wiped now: ${plural(s.packets, 'work order')} kept on this tablet. Keep ${s.packets === 1 ? 'it' : 'them'} on the tablet again after signing in (needs the network).` : 'No work orders are kept on this tablet, so none are wiped.');
  if (s.kept) lines.push(`Kept: Bench progress on ${plural(s.kept, 'half-built core')}. After you sign in online and choose a new passphrase, keep ${s.workOrders === 1 ? 'its work order' : 'their work orders'} on the tablet again and each core resumes where it stopped.`);
  if (s.lost) lines.push(`Lost: Bench progress on ${plural(s.lost, 'core')} saved by an older version of the app; ${s.lost === 1 ? 'it starts' : 'they start'} again from the first chamber.`);
  lines.push(waiting ? `Kept: ${plural(waiting, 'finished record')} in the outbox; ${waiting === 1 ? 'it syncs' : 'they sync'} after you sign in again.` : 'The outbox is empty: all finished work has synced.');
  return lines;
}
