/**
 * Persistent storage: without it a browser may evict the origin's IndexedDB under disk
 * pressure, outbox included. Asked for at sign-in; the answer is shown, never assumed.
 */
export type Persistence = 'persisted' | 'best-effort' | 'unsupported';

export async function requestPersistence(): Promise<Persistence> {
  const storage = typeof navigator !== 'undefined' ? navigator.storage : undefined;
  if (!storage?.persist) return 'unsupported';
  try {
    if (await storage.persisted()) return 'persisted';
    return (await storage.persist()) ? 'persisted' : 'best-effort';
  } catch {
    return 'best-effort';
  }
}
