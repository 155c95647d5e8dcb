/**
 * What a core tag's QR code holds: the tag id and the door label, as two plain lines any
 * phone can read. Never a bitting or a key symbol: a tag sits on a door for anyone to scan.
 */
export function tagText(tag: string, doorLabel: string | null): string {
  return `CORE ${tag}\nDOOR ${doorLabel ?? '-'}`;
}
