// The one rule for text files (scenarios and CSV wind files), on the command line and in the page:
// UTF-8, with or without the UTF-8 byte-order mark (editors on some systems write one; it is
// dropped). UTF-16 and UTF-32 are refused (by their byte-order mark, or by the zero bytes every
// ASCII character has in them), and so is any byte sequence that is not UTF-8, with the place of
// its first bad byte. Nothing is ever turned silently into replacement characters: a scenario
// whose text changed on the way in would not be the scenario written.

import { InputError } from '../errors.ts';

export class TextEncodingError extends InputError {
  override name = 'TextEncodingError';
}

const strict = new TextDecoder('utf-8', { fatal: true, ignoreBOM: false });

/** The text of a UTF-8 file (its byte-order mark dropped); a TextEncodingError that says why not. */
export function decodeUtf8Text(bytes: Uint8Array): string {
  const other = otherEncoding(bytes);
  if (other) throw new TextEncodingError(`the file is ${other}; save it as UTF-8`);
  try {
    // The decoder drops a leading UTF-8 byte-order mark itself (ignoreBOM: false).
    return strict.decode(bytes);
  } catch {
    const at = firstBadByte(bytes);
    const { line, column } = placeOf(bytes, at);
    const b = bytes[at];
    throw new TextEncodingError(
      `the file is not UTF-8 text: byte ${at} (line ${line}, column ${column}) is 0x${b.toString(16).toUpperCase().padStart(2, '0')}, which does not begin a valid UTF-8 character; save it as UTF-8`,
    );
  }
}

function isContinuation(b: number): boolean {
  return (b & 0xc0) === 0x80;
}

/** "UTF-16 text (little-endian, by its byte-order mark)" and the like, or null for anything else. */
function otherEncoding(b: Uint8Array): string | null {
  if (b.length >= 4 && b[0] === 0xff && b[1] === 0xfe && b[2] === 0 && b[3] === 0)
    return 'UTF-32 text (little-endian, by its byte-order mark)';
  if (b.length >= 4 && b[0] === 0 && b[1] === 0 && b[2] === 0xfe && b[3] === 0xff)
    return 'UTF-32 text (big-endian, by its byte-order mark)';
  if (b.length >= 2 && b[0] === 0xff && b[1] === 0xfe) return 'UTF-16 text (little-endian, by its byte-order mark)';
  if (b.length >= 2 && b[0] === 0xfe && b[1] === 0xff) return 'UTF-16 text (big-endian, by its byte-order mark)';
  // Without a mark: ASCII characters in UTF-16 come with a zero byte beside each one.
  const pairs = Math.min(128, b.length >> 1);
  if (pairs < 2) return null;
  let low = 0;
  let high = 0;
  for (let k = 0; k < pairs; k++) {
    const a = b[2 * k];
    const c = b[2 * k + 1];
    if (a !== 0 && c === 0) low++;
    else if (a === 0 && c !== 0) high++;
  }
  if (low >= pairs * 0.75) return 'UTF-16 text (little-endian: a zero byte after every ASCII character)';
  if (high >= pairs * 0.75) return 'UTF-16 text (big-endian: a zero byte before every ASCII character)';
  return null;
}

/** Offset of the first byte that does not begin a well-formed UTF-8 character. */
function firstBadByte(b: Uint8Array): number {
  let k = 0;
  const n = b.length;
  while (k < n) {
    const c = b[k];
    if (c < 0x80) {
      k++;
      continue;
    }
    let need: number;
    let lo = 0x80;
    let hi = 0xbf;
    if (c >= 0xc2 && c <= 0xdf) need = 1;
    else if (c >= 0xe0 && c <= 0xef) {
      need = 2;
      if (c === 0xe0) lo = 0xa0;
      if (c === 0xed) hi = 0x9f; // no surrogates
    } else if (c >= 0xf0 && c <= 0xf4) {
      need = 3;
      if (c === 0xf0) lo = 0x90;
      if (c === 0xf4) hi = 0x8f; // nothing above U+10FFFF
    } else return k;
    for (let m = 1; m <= need; m++) {
      const d = b[k + m];
      if (d === undefined) return k;
      const [l, h] = m === 1 ? [lo, hi] : [0x80, 0xbf];
      if (d < l || d > h) return k; // the character that starts at k is broken
    }
    k += need + 1;
  }
  return n - 1;
}

/** 1-based line and column (in characters) of a byte offset. */
function placeOf(b: Uint8Array, at: number): { line: number; column: number } {
  let line = 1;
  let column = 1;
  for (let k = 0; k < at; k++) {
    if (b[k] === 0x0a) {
      line++;
      column = 1;
    } else if (!isContinuation(b[k])) column++;
  }
  return { line, column };
}
