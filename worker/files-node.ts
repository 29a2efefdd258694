// Node's side of file input and output: a reader for scenario inputs and a ByteSink that writes
// a NetCDF file in place as the run goes (synchronous positional writes: each one is in the
// kernel before the next starts, so a killed process leaves every finished record on disk).

import { closeSync, openSync, readFileSync, writeSync, fsyncSync } from 'node:fs';
import type { ByteSink } from '../model/io/netcdf-writer.ts';
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

export class FileSink implements ByteSink {
  private fd: number | null;

  /** Creates or truncates the file. */
  constructor(readonly path: string) {
    this.fd = openSync(path, 'w');
  }

  write(offset: number, bytes: Uint8Array): void {
    if (this.fd === null) throw new Error(`${this.path}: the file is closed`);
    let done = 0;
    while (done < bytes.length) done += writeSync(this.fd, bytes, done, bytes.length - done, offset + done);
  }

  /** Push the data to the disk (not only the kernel's cache), then close. */
  close(): void {
    if (this.fd === null) return;
    try {
      fsyncSync(this.fd);
    } finally {
      closeSync(this.fd);
      this.fd = null;
    }
  }
}
