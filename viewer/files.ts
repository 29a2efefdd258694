// Files out of the page: the one download (of bytes, text or a blob) and names safe for a file
// (picked and dropped files are read by viewer/picked-file.ts, under the command line's limits).

export function download(data: Uint8Array | string | Blob, fileName: string, type: string): void {
  const blob =
    data instanceof Blob
      ? data
      : new Blob([typeof data === 'string' ? data : (data as Uint8Array<ArrayBuffer>)], { type });
  const a = document.createElement('a');
  a.href = URL.createObjectURL(blob);
  a.download = fileName;
  document.body.append(a);
  a.click();
  a.remove();
  // Later, so the browser has started the download before the address goes.
  setTimeout(() => URL.revokeObjectURL(a.href), 10_000);
}

/** A name safe for a file: letters, digits, dot, dash and underscore. */
export function fileSafe(name: string): string {
  const s = name
    .trim()
    .replace(/[^A-Za-z0-9._-]+/g, '-')
    .replace(/^-+|-+$/g, '');
  return s || 'run';
}
