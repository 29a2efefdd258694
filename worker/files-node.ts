// Node's side of file input: every file the command line reads (scenarios, wind files, restart
// files, run files) goes through readBounded. Only regular files are read: a folder, a named pipe
// (which would block forever), a device (/dev/zero would be read until memory runs out) or a
// socket is refused with what it is. The size is checked before reading against the limit of
// the file's kind (model/io/read-limits.ts), and no more than the limit is ever read, also from
// a file that grows meanwhile. Output files are written by worker/cli/output-file.ts.

import { closeSync, constants, fstatSync, openSync, readSync, type Stats } from 'node:fs';
import { READ_LIMITS, sizeText, tooLarge, type ReadLimit } from '../model/io/read-limits.ts';
import { decodeUtf8Text } from '../model/io/text-decode.ts';
import type { InputReader } from '../model/scenario/load-inputs.ts';

/** A file that is not read: the message says why, for after "cannot read ... PATH: ". */
export class ReadRefused extends Error {
  override name = 'ReadRefused';
}

const REASONS: Record<string, string> = {
  ENOENT: 'no such file',
  EACCES: 'permission denied',
  EPERM: 'permission denied',
  ENOTDIR: 'a part of the path is not a folder',
  ENAMETOOLONG: 'the name is too long',
  ELOOP: 'too many symbolic links',
  EISDIR: 'it is a folder, not a file',
  ENXIO: 'it is a device or socket that cannot be opened for reading',
  EIO: 'the device reported an input/output error',
};

/** What a path that is not a regular file is, in words. */
export function kindOf(st: Stats): string {
  if (st.isDirectory()) return 'a folder';
  if (st.isFIFO()) return 'a named pipe';
  if (st.isCharacterDevice()) return 'a character device';
  if (st.isBlockDevice()) return 'a block device';
  if (st.isSocket()) return 'a socket';
  return 'not a regular file';
}

function reason(e: unknown): string {
  const code = (e as NodeJS.ErrnoException).code;
  return (code && REASONS[code]) ?? (e as Error).message;
}

/** The bytes of a regular file of at most limit.maxBytes; a ReadRefused with the reason otherwise. */
export function readBounded(path: string, limit: ReadLimit): Uint8Array {
  if (path === '') throw new ReadRefused('the path is empty');
  let fd: number;
  try {
    // Non-blocking, so that opening a named pipe with no writer returns at once (it is then refused).
    fd = openSync(path, constants.O_RDONLY | constants.O_NONBLOCK);
  } catch (e) {
    throw new ReadRefused(reason(e));
  }
  try {
    const st = fstatSync(fd);
    if (!st.isFile()) throw new ReadRefused(`it is ${kindOf(st)}, not a regular file; only regular files are read`);
    const big = tooLarge(st.size, limit);
    if (big) throw new ReadRefused(big);
    // Read to the end, but never past the limit: a file that grew after fstat (or reports no size,
    // as some virtual files do) is read on, up to limit + 1 bytes, and then refused.
    const readInto = (buf: Uint8Array, from: number): number => {
      let got = from;
      while (got < buf.length) {
        let n: number;
        try {
          n = readSync(fd, buf, got, buf.length - got, null);
        } catch (e) {
          throw new ReadRefused(reason(e));
        }
        if (n === 0) break;
        got += n;
      }
      return got;
    };
    let buf = new Uint8Array(st.size);
    let got = readInto(buf, 0);
    if (got < buf.length) return buf.slice(0, got); // it shrank
    for (;;) {
      const probe = new Uint8Array(1);
      if (readInto(probe, 0) === 0) return buf; // the usual case: exactly the size fstat gave
      if (got + 1 > limit.maxBytes)
        throw new ReadRefused(
          `the file grew while it was read, past ${limit.what}'s limit of ${sizeText(limit.maxBytes)}`,
        );
      const bigger = new Uint8Array(Math.min(Math.max(2 * (got + 1), 65536), limit.maxBytes + 1));
      bigger.set(buf.subarray(0, got));
      bigger[got] = probe[0];
      got = readInto(bigger, got + 1);
      if (got > limit.maxBytes)
        throw new ReadRefused(
          `the file grew while it was read, past ${limit.what}'s limit of ${sizeText(limit.maxBytes)}`,
        );
      if (got < bigger.length) return bigger.slice(0, got);
      buf = bigger;
    }
  } finally {
    closeSync(fd);
  }
}

/** A scenario file's text: a regular file of at most 16 MiB, UTF-8 (the page's rule too); ReadRefused or TextEncodingError. */
export function readScenarioText(path: string): string {
  return decodeUtf8Text(readBounded(path, READ_LIMITS.scenario));
}

/** readBounded as the scenario loader's reader (an absolute path and the limit of the file's kind). */
export const nodeReader: InputReader = async (path, limit) => readBounded(path, limit);
