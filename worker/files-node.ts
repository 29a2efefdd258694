// Node's side of file input: a reader for scenario inputs. Output files are written by
// worker/cli/output-file.ts (temporary name, lock, atomic rename).

import { readFileSync } from 'node:fs';
import type { InputReader } from '../model/scenario/load-inputs.ts';

export const nodeReader: InputReader = async (path) => {
  try {
    return new Uint8Array(readFileSync(path));
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new Error('no such file');
    if (code === 'EISDIR') throw new Error('it is a directory');
    if (code === 'EACCES') throw new Error('permission denied');
    throw e;
  }
};
