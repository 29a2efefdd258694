// A checksum of a field's exact bits (FNV-1a over the Float32 bytes), so a page run and a Node run
// can be compared bit for bit without moving the arrays around.

export function fieldChecksum(a: Float32Array): string {
  const bytes = new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
  let h = 0x811c9dc5;
  for (let k = 0; k < bytes.length; k++) {
    h ^= bytes[k];
    h = Math.imul(h, 0x01000193);
  }
  return (h >>> 0).toString(16).padStart(8, '0');
}
