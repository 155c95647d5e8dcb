/** Hands a fetched file (a CSV export) to the browser as a download. */
export function saveFile(blob: Blob, filename: string): void {
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = filename;
  a.click();
  // Let the browser start the download before the object URL goes away.
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
