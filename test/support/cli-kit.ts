// Shared by the hostile command-line tests of output files, blow-ups and untrusted run files:
// real `node bin/pycno.js` invocations in a temporary folder, a run killed without warning, a
// small file system that fills up, and the checks every refusal must pass.

import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { copyFileSync, mkdirSync, mkdtempSync, readFileSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { expect } from 'vitest';
import { readNetcdf, type NcFile } from '../../model/io/netcdf-read.ts';
import { FIXTURE } from './engine-fixture.ts';

export const BIN = fileURLToPath(new URL('../../bin/pycno.js', import.meta.url));

export interface Ran {
  code: number | null;
  stdout: string;
  stderr: string;
  ms: number;
}

/** A temporary folder holding the tiny fixture as tiny.json. */
export function folder(prefix: string): string {
  const dir = mkdtempSync(join(tmpdir(), `pycno-${prefix}-`));
  copyFileSync(FIXTURE, join(dir, 'tiny.json'));
  return dir;
}

export function pycno(dir: string, args: string[], timeout = 60_000): Ran {
  const t0 = performance.now();
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: dir, encoding: 'utf8', timeout });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr, ms: performance.now() - t0 };
}

/** The same, not waiting: resolves when it exits. */
export function pycnoAsync(dir: string, args: string[]): { child: ChildProcess; done: Promise<Ran> } {
  const t0 = performance.now();
  const child = spawn(process.execPath, [BIN, ...args], { cwd: dir, stdio: ['ignore', 'pipe', 'pipe'] });
  let stdout = '';
  let stderr = '';
  child.stdout!.on('data', (b) => (stdout += b));
  child.stderr!.on('data', (b) => (stderr += b));
  const done = new Promise<Ran>((resolve) =>
    child.on('close', (code) => resolve({ code, stdout, stderr, ms: performance.now() - t0 })),
  );
  return { child, done };
}

/** Exit 2 with one clear line: the expected text, no stack, no internal error. */
export function refusedWith(r: Ran, line: RegExp): void {
  expect(r.code, `${r.stderr}\n${r.stdout}`).toBe(2);
  const lines = r.stderr.trimEnd().split('\n');
  expect(lines.length, r.stderr).toBe(1);
  expect(lines[0]).toMatch(line);
  noInternals(r);
}

export function noInternals(r: Ran): void {
  expect(r.stderr).not.toMatch(
    /internal error| {4}at |TypeError|RangeError|is not a function|node:internal|\[object Object\]/,
  );
}

/** Files in the folder whose names start with `prefix` (the output, its .part-N and .lock). */
export function filesLike(dir: string, prefix: string): string[] {
  return readdirSync(dir)
    .filter((f) => f.startsWith(prefix))
    .sort();
}

export function nc(path: string): NcFile {
  return readNetcdf(new Uint8Array(readFileSync(path)));
}

/** Model days of a run file's records; a whole run has them strictly increasing from its start. */
export function days(f: NcFile): number[] {
  return Array.from(f.variable('time').values as Float64Array);
}

export function increasing(xs: readonly number[]): boolean {
  return xs.every((x, k) => k === 0 || x > xs[k - 1]);
}

/** Records in the header of a file that may be growing (0 when not yet NetCDF). */
export function recordsIn(path: string): number {
  try {
    const b = new Uint8Array(readFileSync(path));
    return b.length >= 8 && b[0] === 0x43 ? new DataView(b.buffer, b.byteOffset).getUint32(4) : 0;
  } catch {
    return 0;
  }
}

/** Poll until `ok()` or the child exits (rejects then: the run was too short to catch). */
export function when(child: ChildProcess, ok: () => boolean, every = 5): Promise<void> {
  return new Promise((resolve, reject) => {
    const timer = setInterval(() => {
      if (ok()) {
        clearInterval(timer);
        resolve();
      }
    }, every);
    child.once('exit', () => {
      clearInterval(timer);
      if (ok()) resolve();
      else reject(new Error('the run ended first; make it longer'));
    });
  });
}

/** A run long enough (several seconds) to be caught while it writes: 0.1-degree cells, 60 days. */
export const LONG = ['--set', 'basin.resolution=0.1', '--days', '60'];

/**
 * A small tmpfs of `kib` KiB mounted inside `dir` (needs root, as in CI's container); null with
 * the reason when this machine does not allow it. The caller unmounts with `unmount`.
 */
export function smallDisk(dir: string, kib: number): { path: string } | { skip: string } {
  const path = join(dir, `disk-${kib}k`);
  mkdirSync(path);
  if (process.getuid?.() !== 0) return { skip: 'mounting a small tmpfs needs root' };
  const r = spawnSync('mount', ['-t', 'tmpfs', '-o', `size=${kib}k`, 'tmpfs', path], { encoding: 'utf8' });
  return r.status === 0
    ? { path }
    : { skip: `cannot mount a tmpfs here: ${(r.stderr || r.error?.message || '').trim()}` };
}

export function unmount(path: string): void {
  spawnSync('umount', [path]);
}
