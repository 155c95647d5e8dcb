/**
 * The unlock secret must survive offline guessing: whoever copies the tablet's storage can
 * try passphrases at PBKDF2 speed with no attempt counter, so a 4–6 digit PIN (a million
 * tries at most) would fall in minutes. Twelve characters, or three real words, is the floor.
 */
export const PASSPHRASE_RULE =
  'Use a passphrase of at least 12 characters, or three or more words (for example “brass tray shear line”). A short PIN is not enough: someone holding the tablet could guess it offline.';

const MIN_LENGTH = 12;
const MAX_LENGTH = 256;
const COMMON = new Set(['password1234', 'passwordpassword', '123456789012', 'qwertyuiopas', 'corewright12', 'letmeinletmein']);

export type PassphraseCheck = { ok: true } | { ok: false; message: string };

export function checkPassphrase(passphrase: string): PassphraseCheck {
  const text = passphrase.normalize('NFKC');
  const length = [...text].length;
  const words = text.split(/[\s\-_.,]+/).filter((w) => [...w].length >= 3);
  if (/^\d+$/.test(text) && length < MIN_LENGTH) return { ok: false, message: `A PIN is not enough. ${PASSPHRASE_RULE}` };
  if (length > MAX_LENGTH) return { ok: false, message: `Use at most ${MAX_LENGTH} characters.` };
  if (length < MIN_LENGTH && words.length < 3) return { ok: false, message: PASSPHRASE_RULE };
  if (new Set(text.toLowerCase()).size < 4) return { ok: false, message: `Use more than a few different characters. ${PASSPHRASE_RULE}` };
  if (COMMON.has(text.toLowerCase().replace(/\s+/g, ''))) return { ok: false, message: `That passphrase is too common. ${PASSPHRASE_RULE}` };
  return { ok: true };
}
