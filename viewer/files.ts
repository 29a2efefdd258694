// Files in and out of the page: the one download (of bytes, text or a blob), a picked or dropped
// file's bytes, and names safe for a file.

export function download(data: Uint8Array | string | Blob, fileName: string, type: string): void {
  const blob = data instanceof Blob ? data : new Blob([typeof data === 'string' ? data : (data as Uint8Array<ArrayBuffer>)], { type });
  const a = document.createElement('a');
  a.href = URL.createObjectURL(blob);
  a.download = fileName;
  document.body.append(a);
  a.click();
  a.remove();
  // Later, so the browser has started the download before the address goes.
  setTimeout(() => URL.revokeObjectURL(a.href), 10_000);
}

export async function fileBytes(file: File): Promise<Uint8Array> {
  return new Uint8Array(await file.arrayBuffer());
}

/** A name safe for a file: letters, digits, dot, dash and underscore. */
export function fileSafe(name: string): string {
  const s = name.trim().replace(/[^A-Za-z0-9._-]+/g, '-').replace(/^-+|-+$/g, '');
  return s || 'run';
}
