/**
 * What a core tag's QR code holds: the tag id and the door label, as two plain lines any
 * phone can read. Never a bitting: a tag sits on a core or a door for anyone to read. The key
 * symbol is printed beside the code (not in it) so the core reaches the door its key opens.
 */
export function tagText(tag: string, doorLabel: string | null): string {
  return `CORE ${tag}\nDOOR ${doorLabel ?? '-'}`;
}

/** The printed key line of a tag: the operating change key's symbol, and the cross-keyed one if any. */
export function tagKeyLine(keySymbol: string | null | undefined, crossKeySymbol?: string | null): string {
  if (!keySymbol) return 'Key —';
  return crossKeySymbol ? `Keys ${keySymbol} + ${crossKeySymbol}` : `Key ${keySymbol}`;
}
