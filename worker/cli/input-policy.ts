// Files named by a run file from someone else. The scenario embedded in a run file (pycno rerun)
// is not the user's own: a crafted file can name a device (/dev/zero is read until memory runs
// out), a private file or a fifo. So a command that runs an embedded scenario reads only what the
// user allowed on the command line: regular files inside the folder given with --inputs DIR
// (symbolic links followed, and the file they lead to must be inside too). Without --inputs it
// reads no file at all and says which path the scenario names.

import { realpathSync, statSync } from 'node:fs';
import { isAbsolute, relative } from 'node:path';

/**
 * A check for each path the embedded scenario asks for (absolute, as resolved by the loader):
 * returns the real path to read, or throws an Error whose message says why it is not read (the
 * loader puts it after "cannot read the wind file PATH: ").
 */
export function allowedInputs(
  folder: string | null,
  shown = folder ?? '',
  option = '--inputs',
): (path: string) => string {
  let root: string | null = null;
  if (folder !== null) {
    try {
      root = realpathSync(folder);
    } catch {
      throw new Error(`${option} ${shown}: no such folder`);
    }
    if (!statSync(root).isDirectory()) throw new Error(`${option} ${shown}: is not a folder`);
  }
  return (path: string) => {
    if (root === null) {
      throw new Error(
        `the run file's scenario names this file, and a run file from elsewhere may not choose what is read: give ${option} DIR to allow the regular files inside folder DIR`,
      );
    }
    let real: string;
    try {
      real = realpathSync(path);
    } catch {
      throw new Error('no such file');
    }
    const rel = relative(root, real);
    if (rel === '' || rel.startsWith('..') || isAbsolute(rel)) {
      throw new Error(
        `it lies outside ${option} ${shown}${real !== path ? ` (it leads to ${real})` : ''}; only files inside that folder are read`,
      );
    }
    const st = statSync(real);
    if (!st.isFile())
      throw new Error(
        `it is not a regular file (${st.isDirectory() ? 'a folder' : st.isCharacterDevice() ? 'a character device' : st.isFIFO() ? 'a named pipe' : 'a special file'}); only regular files are read`,
      );
    return real;
  };
}
