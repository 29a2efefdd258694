// The report's PNG encoder, checked by decoding its output with Node's zlib.

import { inflateSync, crc32 as nodeCrc32 } from 'node:zlib';
import { decodePng } from '../support/decode-png.ts';
import { describe, expect, it } from 'vitest';
import { adler32, base64, crc32, encodePng, zlibStored } from '../../model/report/png.ts';

describe('PNG encoder', () => {
  it('CRC-32 and Adler-32 agree with known values and Node', () => {
    const text = new TextEncoder().encode('123456789');
    expect(crc32(text)).toBe(0xcbf43926); // the check value of CRC-32 (ISO-HDLC)
    expect(adler32(new TextEncoder().encode('Wikipedia'))).toBe(0x11e60398); // a widely quoted example
    const big = Uint8Array.from({ length: 200_000 }, (_, k) => (k * 7919) & 0xff);
    expect(crc32(big)).toBe(nodeCrc32(Buffer.from(big)));
  });

  it('stored zlib streams inflate back, across several blocks', () => {
    for (const n of [0, 1, 65535, 65536, 200_001]) {
      const data = Uint8Array.from({ length: n }, (_, k) => (k * 31 + (k >> 8)) & 0xff);
      expect(Buffer.from(inflateSync(zlibStored(data))).equals(Buffer.from(data))).toBe(true);
    }
  });

  it('an image decodes to its pixels', () => {
    const w = 300;
    const h = 123; // more than one deflate block
    const rgb = Uint8Array.from({ length: w * h * 3 }, (_, k) => (k * 13) % 251);
    const back = decodePng(encodePng(w, h, rgb));
    expect([back.width, back.height]).toEqual([w, h]);
    expect(Buffer.from(back.rgb).equals(Buffer.from(rgb))).toBe(true);
    expect(() => encodePng(2, 2, new Uint8Array(11))).toThrow(/expected 12 bytes/);
  });

  it('base64 matches Node for every tail length', () => {
    for (const n of [0, 1, 2, 3, 4, 5, 1000]) {
      const b = Uint8Array.from({ length: n }, (_, k) => (k * 97) & 0xff);
      expect(base64(b)).toBe(Buffer.from(b).toString('base64'));
    }
  });
});
