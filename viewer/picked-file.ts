// Files the user picks or drops on the page are read by the same rules as on the command line
// (model/io/read-limits.ts, model/io/text-decode.ts): the size is checked before a byte is read,
// and text must be UTF-8 (with or without its byte-order mark; UTF-16 and invalid UTF-8 are
// refused with the place of the first bad byte). Blob.text() would have turned bad bytes into
// replacement characters silently, and read a UTF-16 file as if it were fine.

import { READ_LIMITS, tooLarge, type ReadKind } from '../model/io/read-limits.ts';
import { decodeUtf8Text } from '../model/io/text-decode.ts';

/** Why a picked file is not read; the message does not repeat the file name. */
export class PickedFileError extends Error {
  override name = 'PickedFileError';
}

/** The bytes of a picked file, refused before reading when it is larger than its kind allows. */
export async function pickedBytes(file: Blob, kind: ReadKind): Promise<Uint8Array> {
  const big = tooLarge(file.size, READ_LIMITS[kind]);
  if (big) throw new PickedFileError(big);
  return new Uint8Array(await file.arrayBuffer());
}

/** The text of a picked scenario file, or the reason it is refused. */
export async function pickedScenarioText(
  file: Blob,
): Promise<{ ok: true; text: string } | { ok: false; message: string }> {
  try {
    return { ok: true, text: decodeUtf8Text(await pickedBytes(file, 'scenario')) };
  } catch (e) {
    return { ok: false, message: (e as Error).message };
  }
}

/** A gridded wind file's kind by its name: NetCDF names get NetCDF's limit, anything else CSV's. */
export function windFileKind(name: string): ReadKind {
  return /\.(nc|nc4|cdf|netcdf)$/i.test(name) ? 'netcdfInput' : 'csvWind';
}
