// A minimal PNG encoder for the report's images: 8-bit RGB, no interlace, every row with filter
// type 0, the image data in a zlib stream of stored (uncompressed) deflate blocks. Small images
// only, so no compression is worth its code. PNG (ISO/IEC 15948), zlib (RFC 1950) and deflate
// (RFC 1951) layouts; CRC-32 and Adler-32 as those specifications define them.

const CRC_TABLE = (() => {
  const t = new Uint32Array(256);
  for (let n = 0; n < 256; n++) {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    t[n] = c >>> 0;
  }
  return t;
})();

export function crc32(bytes: Uint8Array, crc = 0): number {
  let c = ~crc >>> 0;
  for (let k = 0; k < bytes.length; k++) c = CRC_TABLE[(c ^ bytes[k]) & 0xff] ^ (c >>> 8);
  return ~c >>> 0;
}

export function adler32(bytes: Uint8Array): number {
  let a = 1;
  let b = 0;
  // 5552 is the longest run before b can overflow 2^32 (RFC 1950's NMAX).
  for (let k = 0; k < bytes.length; ) {
    const end = Math.min(k + 5552, bytes.length);
    for (; k < end; k++) {
      a += bytes[k];
      b += a;
    }
    a %= 65521;
    b %= 65521;
  }
  return ((b << 16) | a) >>> 0;
}

/** A zlib stream holding `data` in stored deflate blocks of at most 65535 bytes. */
export function zlibStored(data: Uint8Array): Uint8Array {
  const blocks = Math.max(1, Math.ceil(data.length / 65535));
  const out = new Uint8Array(2 + blocks * 5 + data.length + 4);
  out[0] = 0x78; // deflate, 32 KiB window
  out[1] = 0x01; // no dictionary, fastest; (0x78 * 256 + 0x01) % 31 === 0
  let o = 2;
  for (let b = 0; b < blocks; b++) {
    const from = b * 65535;
    const len = Math.min(65535, data.length - from);
    out[o++] = b === blocks - 1 ? 1 : 0; // BFINAL, BTYPE = 00
    out[o++] = len & 0xff;
    out[o++] = len >>> 8;
    out[o++] = ~len & 0xff;
    out[o++] = (~len >>> 8) & 0xff;
    out.set(data.subarray(from, from + len), o);
    o += len;
  }
  const ad = adler32(data);
  out[o++] = ad >>> 24;
  out[o++] = (ad >>> 16) & 0xff;
  out[o++] = (ad >>> 8) & 0xff;
  out[o++] = ad & 0xff;
  return out;
}

function chunk(type: string, data: Uint8Array): Uint8Array {
  const out = new Uint8Array(12 + data.length);
  const view = new DataView(out.buffer);
  view.setUint32(0, data.length);
  for (let k = 0; k < 4; k++) out[4 + k] = type.charCodeAt(k);
  out.set(data, 8);
  view.setUint32(8 + data.length, crc32(out.subarray(4, 8 + data.length)));
  return out;
}

/** PNG bytes of an RGB image, `rgb` width * height * 3 bytes, top row first. */
export function encodePng(width: number, height: number, rgb: Uint8Array): Uint8Array {
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1)
    throw new RangeError(`PNG size must be whole and positive (got ${width} x ${height})`);
  if (rgb.length !== width * height * 3)
    throw new RangeError(
      `PNG data: expected ${width * height * 3} bytes for ${width} x ${height} RGB, got ${rgb.length}`,
    );
  const ihdr = new Uint8Array(13);
  const v = new DataView(ihdr.buffer);
  v.setUint32(0, width);
  v.setUint32(4, height);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 2; // colour type RGB
  const raw = new Uint8Array(height * (1 + width * 3));
  for (let y = 0; y < height; y++) raw.set(rgb.subarray(y * width * 3, (y + 1) * width * 3), y * (1 + width * 3) + 1);
  const parts = [
    new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr),
    chunk('IDAT', zlibStored(raw)),
    chunk('IEND', new Uint8Array(0)),
  ];
  const out = new Uint8Array(parts.reduce((s, p) => s + p.length, 0));
  let o = 0;
  for (const p of parts) {
    out.set(p, o);
    o += p.length;
  }
  return out;
}

const B64 = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/';

/** Base64 without btoa or Buffer, so it runs the same in a worker, a page and Node. */
export function base64(bytes: Uint8Array): string {
  const out: string[] = [];
  let k = 0;
  for (; k + 2 < bytes.length; k += 3) {
    const n = (bytes[k] << 16) | (bytes[k + 1] << 8) | bytes[k + 2];
    out.push(B64[n >>> 18] + B64[(n >>> 12) & 63] + B64[(n >>> 6) & 63] + B64[n & 63]);
  }
  if (k < bytes.length) {
    const n = (bytes[k] << 16) | ((bytes[k + 1] ?? 0) << 8);
    out.push(B64[n >>> 18] + B64[(n >>> 12) & 63] + (k + 1 < bytes.length ? B64[(n >>> 6) & 63] : '=') + '=');
  }
  return out.join('');
}

export function pngDataUrl(width: number, height: number, rgb: Uint8Array): string {
  return `data:image/png;base64,${base64(encodePng(width, height, rgb))}`;
}
