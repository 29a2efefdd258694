// Decoding the report's PNGs in tests, with Node's zlib doing the inflating.

import { inflateSync, crc32 as nodeCrc32 } from 'node:zlib';
import { expect } from 'vitest';

/** Decode our PNG: chunks with their CRCs, IHDR, IDAT through zlib, filter bytes 0. */
export function decodePng(png: Uint8Array): { width: number; height: number; rgb: Uint8Array } {
  expect(Array.from(png.subarray(0, 8))).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
  const view = new DataView(png.buffer, png.byteOffset, png.byteLength);
  let o = 8;
  let width = 0;
  let height = 0;
  const idat: Buffer[] = [];
  const types: string[] = [];
  while (o < png.length) {
    const len = view.getUint32(o);
    const type = String.fromCharCode(...png.subarray(o + 4, o + 8));
    const data = png.subarray(o + 8, o + 8 + len);
    expect(view.getUint32(o + 8 + len)).toBe(nodeCrc32(Buffer.from(png.subarray(o + 4, o + 8 + len))));
    types.push(type);
    if (type === 'IHDR') {
      const h = new DataView(data.buffer, data.byteOffset, data.byteLength);
      width = h.getUint32(0);
      height = h.getUint32(4);
      expect(Array.from(data.subarray(8))).toEqual([8, 2, 0, 0, 0]);
    }
    if (type === 'IDAT') idat.push(Buffer.from(data));
    o += 12 + len;
  }
  expect(types).toEqual(['IHDR', 'IDAT', 'IEND']);
  const raw = inflateSync(Buffer.concat(idat));
  expect(raw.length).toBe(height * (1 + 3 * width));
  const rgb = new Uint8Array(width * height * 3);
  for (let y = 0; y < height; y++) {
    expect(raw[y * (1 + 3 * width)]).toBe(0);
    rgb.set(raw.subarray(y * (1 + 3 * width) + 1, (y + 1) * (1 + 3 * width)), y * width * 3);
  }
  return { width, height, rgb };
}
