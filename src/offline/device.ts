/**
 * The device's one id, kept in the offline store: sign-in, the escrow key and every sync
 * batch carry it, and the server's device row and the outbox's escrow wrapping are bound to
 * it. Once a vault is set up, the vault record's id is the one (it sealed the outbox).
 * Older versions kept the id in localStorage "cw.device"; the first read moves it here and
 * removes it there, so a tablet keeps its id across the update.
 */
import { promisifyRequest } from 'idb-keyval';
import { KEY, kvStore } from './db';
import { up } from './vaultRecord';

/** Where older versions kept the id; read once, then removed. */
export const LEGACY_DEVICE_KEY = 'cw.device';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const asId = (v: unknown): string | null => (typeof v === 'string' && UUID.test(v) ? v : null);

function legacyStorage(): Storage | null {
  try {
    return typeof localStorage === 'undefined' ? null : localStorage;
  } catch {
    return null; // storage blocked by the browser's settings
  }
}

/**
 * Reads the id, making it on first use: the vault's, else the one stored here, else the
 * old localStorage one, else a new UUID. Read and write share one transaction, so two tabs
 * asking at once get the same id.
 */
export async function deviceId(): Promise<string> {
  const legacy = legacyStorage();
  const old = asId(legacy?.getItem(LEGACY_DEVICE_KEY));
  const id = await kvStore()('readwrite', async (os) => {
    const [vault, stored] = await Promise.all([promisifyRequest(os.get(KEY.vault)), promisifyRequest(os.get(KEY.device))]);
    const chosen = up(vault)?.deviceId ?? asId(stored) ?? old ?? crypto.randomUUID();
    if (chosen !== stored) os.put(chosen, KEY.device);
    await promisifyRequest(os.transaction);
    return chosen;
  });
  legacy?.removeItem(LEGACY_DEVICE_KEY);
  return id;
}
