// Output files of the command line that never destroy what was there (docs/reliability.md,
// "Output files").
//
// - A file is written under a temporary name beside its target (same folder, so the final rename
//   is atomic): `NAME.part-PID`. Only a complete file is renamed over the target, after an fsync;
//   a killed run leaves the target as it was and the temporary file with what was done.
// - A lock file `NAME.lock` (created exclusively, holding the writer's process id) keeps two runs
//   from writing the same target at once; a lock whose process is gone is taken over. Even if two
//   writers got past it (a lock on a network file system), each writes its own temporary file and
//   the target ends up as one whole run, never a mix.
// - A target that is one of the command's inputs (by name, through a symbolic link or as a hard
//   link to the same file), or another output of the same command, is refused.
// - A write failure (disk full, quota, I/O error) is an OutputWriteError that says what, where and
//   how much; the unfinished file is removed unless the caller keeps it.
// - Character devices (/dev/null, /dev/full) are written in place: there is nothing to replace.

import {
  accessSync,
  closeSync,
  constants,
  fchmodSync,
  fsyncSync,
  lstatSync,
  openSync,
  readFileSync,
  realpathSync,
  renameSync,
  statSync,
  statfsSync,
  unlinkSync,
  writeSync,
  type Stats,
} from 'node:fs';
import { hostname } from 'node:os';
import { basename, dirname, join, resolve as resolvePath } from 'node:path';
import { threadId } from 'node:worker_threads';
import type { ByteSink } from '../../model/io/netcdf-writer.ts';
import { formatBytes } from './progress.ts';

/** The output cannot be written as asked: one line for the user, exit 2. */
export class OutputRefused extends Error {
  override name = 'OutputRefused';
}

/** Writing failed part way (disk full, quota, I/O error). */
export class OutputWriteError extends Error {
  override name = 'OutputWriteError';
  constructor(
    /** The errno code, e.g. ENOSPC. */
    readonly code: string,
    /** The reason in words, e.g. "no space left on the device". */
    readonly reason: string,
    /** The file written (the temporary name, or the device). */
    readonly file: string,
    /** Bytes written into it before the failure. */
    readonly written: number,
  ) {
    super(`${file}: ${reason}`);
  }
}

const REASONS: Record<string, string> = {
  ENOSPC: 'no space left on the device',
  EDQUOT: 'the disk quota is used up',
  EFBIG: 'the file would be larger than this system allows',
  EIO: 'the device reported an input/output error',
  EROFS: 'the file system is read-only',
  EACCES: 'permission denied',
  EPERM: 'permission denied',
  ENOENT: 'the folder does not exist',
  ENOTDIR: 'a part of the path is not a folder',
  EISDIR: 'it is a folder',
  ENAMETOOLONG: 'the name is too long',
  ELOOP: 'too many symbolic links',
};

function errnoCode(e: unknown): string {
  return (e as NodeJS.ErrnoException)?.code ?? '';
}

export function reasonOf(e: unknown): string {
  return REASONS[errnoCode(e)] ?? (e instanceof Error ? e.message : String(e));
}

/** A file a command reads, for the check that no output lands on it. */
export interface ReadFile {
  /** As resolved (absolute). */
  path: string;
  /** What it is, for the message: "the scenario file tiny.json", "run A (a.nc)". */
  what: string;
}

export interface OutputPlan {
  /** The option that named it, for messages: '--out', '--restart-out'. */
  option: string;
  /** The name as the user wrote it. */
  shown: string;
  /** The file that will be replaced: the path given with symbolic links followed. */
  target: string;
  /** A character device (/dev/null, /dev/full): written in place, no temporary file, no lock. */
  device: boolean;
  /** An existing regular file that a successful run replaces. */
  replaces: boolean;
  /** The existing file's permission bits, given to its replacement. */
  mode: number | null;
  /** The size of the complete file, when known, for messages about space. */
  needBytes?: number;
}

/** Free bytes for this user on the file system of a folder; null when it does not say. */
export function freeBytesAt(dir: string): number | null {
  try {
    const s = statfsSync(dir);
    // Some file systems (network, FUSE) report no blocks at all: they do not say.
    return s.blocks > 0 ? s.bavail * s.bsize : null;
  } catch {
    return null;
  }
}

/**
 * Refuse before any work when the file system says the file cannot fit: the complete file must
 * fit beside the file it replaces, which stays until the end.
 */
export function checkSpace(plan: OutputPlan, needBytes: number): void {
  plan.needBytes = needBytes;
  if (plan.device) return;
  const free = freeBytesAt(dirname(plan.target));
  if (free !== null && needBytes > free) {
    throw new OutputRefused(
      `${plan.option} ${plan.shown}: not enough space: the file needs about ${formatBytes(needBytes)}, ${formatBytes(free)} are free there${plan.replaces ? ` (the ${plan.shown} there now stays until the run has finished)` : ''}`,
    );
  }
}

function statOrNull(path: string, follow: boolean): Stats | null {
  try {
    return follow ? statSync(path) : lstatSync(path);
  } catch (e) {
    if (errnoCode(e) === 'ENOENT' || errnoCode(e) === 'ENOTDIR') return null;
    throw e;
  }
}

function kindOf(s: Stats): string {
  if (s.isDirectory()) return 'a folder';
  if (s.isFIFO()) return 'a named pipe';
  if (s.isSocket()) return 'a socket';
  if (s.isBlockDevice()) return 'a block device';
  return 'not a regular file';
}

/** The same file: one inode (a hard link, a symbolic link) or one real path. */
function sameFile(a: string, aStat: Stats | null, b: string): boolean {
  const bStat = statOrNull(b, true);
  if (aStat && bStat && aStat.dev === bStat.dev && aStat.ino === bStat.ino) return true;
  const real = (p: string) => {
    try {
      return realpathSync(p);
    } catch {
      return resolvePath(p);
    }
  };
  return real(a) === real(b);
}

/**
 * Check an output name before anything is written: where it really is, that it is not one of the
 * command's inputs nor another of its outputs, and that it can be a file. Throws OutputRefused.
 */
export function planOutput(
  option: string,
  shown: string,
  cwd: string,
  reads: readonly ReadFile[] = [],
  others: readonly OutputPlan[] = [],
): OutputPlan {
  const refuse = (why: string): never => {
    throw new OutputRefused(`${option} ${shown}: ${why}`);
  };
  if (shown === '') refuse('needs a file name');
  const given = resolvePath(cwd, shown);
  let link: Stats | null;
  let st: Stats | null;
  try {
    link = statOrNull(given, false);
    st = link?.isSymbolicLink() ? statOrNull(given, true) : link;
  } catch (e) {
    return refuse(`cannot write there: ${reasonOf(e)}`);
  }
  if (link?.isSymbolicLink() && !st)
    refuse('is a symbolic link to a file that does not exist; give the file name itself');
  let target: string;
  if (st) {
    target = link?.isSymbolicLink() ? realpathSync(given) : given;
  } else {
    // A new file: its folder must exist (and is taken with its links followed).
    let dir: string;
    try {
      dir = realpathSync(dirname(given));
    } catch (e) {
      return refuse(
        `cannot write there: ${errnoCode(e) === 'ENOENT' ? `the folder ${dirname(shown) || '.'} does not exist` : reasonOf(e)}`,
      );
    }
    if (!statSync(dir).isDirectory()) refuse(`cannot write there: ${dirname(shown)} is not a folder`);
    target = join(dir, basename(given));
  }
  for (const r of reads) {
    if (sameFile(target, st, r.path)) {
      const alias = resolvePath(r.path) === given ? '' : ' (the same file under another name)';
      refuse(`that is ${r.what}${alias}; an output never replaces an input: write it under another name`);
    }
  }
  for (const o of others) {
    if (sameFile(target, st, o.target) || o.target === target)
      refuse(`is the same file as ${o.option} ${o.shown}; give the two outputs different names`);
  }
  const device = !!st && st.isCharacterDevice();
  if (st && !st.isFile() && !device) refuse(`is ${kindOf(st)}; the output must be a regular file`);
  if (st?.isFile()) {
    // A rename would replace even a file its owner made read-only to keep it: refuse as cp would.
    try {
      accessSync(target, constants.W_OK);
    } catch {
      refuse('is read-only (you cannot write it); an existing file is replaced only when you could write it');
    }
  }
  return { option, shown, target, device, replaces: !!st && st.isFile(), mode: st?.isFile() ? st.mode & 0o7777 : null };
}

// --- locks -------------------------------------------------------------------------------------

interface LockHolder {
  pid: number;
  thread: number;
  host: string;
  started: string;
  token: string;
}

/** Locks this thread holds (a lock of this process and thread that is not here is left over). */
const held = new Set<string>();

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return errnoCode(e) === 'EPERM';
  }
}

function readHolder(lock: string): LockHolder | 'gone' | null {
  let text: string;
  try {
    text = readFileSync(lock, 'utf8');
  } catch (e) {
    return errnoCode(e) === 'ENOENT' ? 'gone' : null;
  }
  try {
    const h = JSON.parse(text) as LockHolder;
    return Number.isInteger(h.pid) && typeof h.host === 'string' ? h : null;
  } catch {
    return null;
  }
}

/** Stale: its process is gone (same machine), or it is this thread's own left from a failure. */
function stale(lock: string, h: LockHolder | null): boolean {
  if (h === null) {
    // Unreadable or half written: a writer between creating and filling it, unless it is old.
    const s = statOrNull(lock, false);
    return !!s && Date.now() - s.mtimeMs > 10_000;
  }
  if (h.host !== hostname()) return false;
  if (h.pid === process.pid) return h.thread === threadId && !held.has(lock);
  return !alive(h.pid);
}

// --- the file ----------------------------------------------------------------------------------

/**
 * One output being written. `open()` takes the lock; `create()` makes the temporary file (the
 * caller may lock early and create late); `commit()` puts the complete file in place;
 * `discard(keep)` ends without replacing anything.
 */
export class OutputFile implements ByteSink {
  private fd: number | null = null;
  private lock: string | null = null;
  private token = '';
  /** The file being written (the temporary name; the device itself for a device). */
  temp: string;
  /** The temporary name as the user would write it (beside the name they gave). */
  tempShown: string;
  /** Bytes written so far (the end of the furthest write). */
  written = 0;
  /** Set when a stale lock of a run that was stopped was taken over: what that run left. */
  takenOver: string | null = null;
  /** After commit() or discard(): whether a temporary file was left. */
  private ended: boolean | null = null;

  private constructor(readonly plan: OutputPlan) {
    this.temp = plan.target;
    this.tempShown = plan.shown;
  }

  /** Take the target's lock (not for devices). Throws OutputRefused when another run holds it. */
  static open(plan: OutputPlan): OutputFile {
    const out = new OutputFile(plan);
    if (!plan.device) out.takeLock();
    return out;
  }

  private takeLock(): void {
    const { option, shown, target } = this.plan;
    const lock = `${target}.lock`;
    this.token = `${process.pid}-${threadId}-${Date.now()}-${Math.random().toString(36).slice(2)}`;
    const me: LockHolder = {
      pid: process.pid,
      thread: threadId,
      host: hostname(),
      started: new Date().toISOString(),
      token: this.token,
    };
    for (let attempt = 0; attempt < 4; attempt++) {
      let fd: number;
      try {
        fd = openSync(lock, 'wx', 0o644);
      } catch (e) {
        if (errnoCode(e) !== 'EEXIST')
          throw new OutputRefused(`${option} ${shown}: cannot write there: ${reasonOf(e)}`);
        const h = readHolder(lock);
        if (h === 'gone') continue;
        if (stale(lock, h)) {
          try {
            unlinkSync(lock);
          } catch {
            /* someone else removed it first */
          }
          this.takenOver = h
            ? `a run that stopped without finishing (process ${h.pid}, started ${h.started}) left its lock; what it wrote is in ${shown}.part-${h.pid} if it got that far`
            : 'an unreadable old lock was removed';
          continue;
        }
        const who = h
          ? `process ${h.pid}${h.host !== hostname() ? ` on ${h.host}` : ''}, started ${h.started}`
          : 'its lock is being written';
        throw new OutputRefused(
          `${option} ${shown}: another pycno run is writing this file (${who}); wait for it to end or choose another name (if no run is writing it, delete ${shown}.lock)`,
        );
      }
      try {
        writeSync(fd, JSON.stringify(me) + '\n');
      } catch (e) {
        closeSync(fd);
        unlinkSync(lock);
        throw new OutputRefused(
          `${option} ${shown}: ${reasonOf(e)} even for its lock file ${shown}.lock${this.spaceNote()}`,
        );
      }
      closeSync(fd);
      this.lock = lock;
      held.add(lock);
      return;
    }
    throw new OutputRefused(
      `${option} ${shown}: its lock file ${shown}.lock keeps changing; another run is starting on it`,
    );
  }

  private releaseLock(): void {
    const lock = this.lock;
    if (!lock) return;
    this.lock = null;
    held.delete(lock);
    const h = readHolder(lock);
    if (h && h !== 'gone' && h.token === this.token) {
      try {
        unlinkSync(lock);
      } catch {
        /* already gone */
      }
    }
  }

  /** Create the temporary file beside the target (or open the device). Throws OutputRefused. */
  create(): void {
    const { option, shown, target, device } = this.plan;
    if (device) {
      try {
        this.fd = openSync(target, 'w');
      } catch (e) {
        throw new OutputRefused(`${option} ${shown}: cannot write there: ${reasonOf(e)}`);
      }
      return;
    }
    const base = `.part-${process.pid}${threadId ? `-${threadId}` : ''}`;
    for (let n = 1; n < 100; n++) {
      const suffix = n === 1 ? base : `${base}-${n}`;
      try {
        this.fd = openSync(`${target}${suffix}`, 'wx', 0o644);
      } catch (e) {
        if (errnoCode(e) === 'EEXIST') continue; // left by an earlier run of a reused process id
        this.releaseLock();
        throw new OutputRefused(`${option} ${shown}: cannot write there: ${reasonOf(e)}`);
      }
      this.temp = `${target}${suffix}`;
      // Beside the name given, so the user finds it where they asked for the file.
      this.tempShown = basename(shown) === basename(target) ? `${shown}${suffix}` : this.temp;
      if (this.plan.mode !== null) {
        try {
          fchmodSync(this.fd, this.plan.mode);
        } catch {
          /* keep the default mode */
        }
      }
      return;
    }
    this.releaseLock();
    throw new OutputRefused(`${option} ${shown}: cannot find a free temporary name beside it (${target}${base}-N)`);
  }

  write(offset: number, bytes: Uint8Array): void {
    if (this.fd === null) throw new Error(`${this.temp}: the file is not open`);
    let done = 0;
    try {
      while (done < bytes.length) done += writeSync(this.fd, bytes, done, bytes.length - done, offset + done);
    } catch (e) {
      throw new OutputWriteError(errnoCode(e), reasonOf(e), this.tempShown, this.written);
    } finally {
      this.written = Math.max(this.written, offset + done);
    }
  }

  /** Push the data written so far to the disk (not only the kernel's cache). Throws OutputWriteError. */
  sync(): void {
    if (this.fd === null) return;
    try {
      fsyncSync(this.fd);
    } catch (e) {
      // A device may not take fsync (EINVAL); a file must.
      if (!(this.plan.device && (errnoCode(e) === 'EINVAL' || errnoCode(e) === 'ENOTSUP'))) {
        throw new OutputWriteError(errnoCode(e), reasonOf(e), this.tempShown, this.written);
      }
    }
  }

  /** Push the data to the disk and put the file in place. Throws OutputWriteError. */
  commit(): void {
    if (this.ended !== null) throw new Error(`${this.tempShown}: the file was already ended`);
    this.sync();
    const fd = this.fd;
    this.fd = null;
    try {
      if (fd !== null) closeSync(fd);
      if (this.plan.device) {
        this.ended = false;
        return;
      }
      renameSync(this.temp, this.plan.target);
      this.ended = false;
      try {
        // The rename itself to the disk: the folder's entry.
        const d = openSync(dirname(this.plan.target), 'r');
        try {
          fsyncSync(d);
        } finally {
          closeSync(d);
        }
      } catch {
        /* not every file system lets a folder be synced */
      }
    } catch (e) {
      // The caller decides (discard) whether the unfinished file stays.
      throw new OutputWriteError(errnoCode(e), reasonOf(e), this.tempShown, this.written);
    } finally {
      this.releaseLock();
    }
  }

  /**
   * End without replacing the target. keep: leave the temporary file (what was written, a valid
   * file up to its last complete record); otherwise remove it. Returns whether a file is left.
   */
  discard(keep: boolean): boolean {
    if (this.ended !== null) return this.ended;
    this.ended = this.end(keep);
    return this.ended;
  }

  private end(keep: boolean): boolean {
    if (this.fd !== null) {
      try {
        if (keep) fsyncSync(this.fd);
      } catch {
        /* the data stays in the kernel's cache */
      }
      try {
        closeSync(this.fd);
      } catch {
        /* closing is all that is left */
      }
      this.fd = null;
    }
    this.releaseLock();
    const temp = !this.plan.device && this.temp !== this.plan.target && statOrNull(this.temp, false) !== null;
    if (!temp) return false;
    if (keep) return true;
    try {
      unlinkSync(this.temp);
    } catch {
      /* already gone */
    }
    return false;
  }

  /** Free bytes on the target's file system, or null when unknown (a device). */
  freeBytes(): number | null {
    return this.plan.device ? null : freeBytesAt(dirname(this.plan.target));
  }

  private spaceNote(): string {
    const free = this.freeBytes();
    const need = this.plan.needBytes;
    return need !== undefined && free !== null
      ? ` (the file needs about ${formatBytes(need)}, ${formatBytes(free)} are free there)`
      : '';
  }

  /** "is as it was" or "was not written", for the end of a failure line. */
  targetState(): string {
    return this.plan.device
      ? ''
      : this.plan.replaces
        ? `${this.plan.shown} is as it was`
        : `${this.plan.shown} was not written`;
  }
}

/**
 * The one line for a write failure: what failed, where, how much the whole file needs against what
 * was written and what is free, and what is left on disk.
 */
export function writeFailureLine(
  out: OutputFile,
  e: OutputWriteError,
  what: string,
  free: number | null,
  kept: boolean,
  keepHint = '',
): string {
  const need = out.plan.needBytes;
  const sizes = [
    need !== undefined ? `the file needs about ${formatBytes(need)}` : '',
    `${formatBytes(e.written)} were written`,
    free !== null ? `${formatBytes(free)} were free` : '',
  ]
    .filter(Boolean)
    .join(', ');
  const left = out.plan.device
    ? ''
    : kept
      ? `; the unfinished file is kept as ${out.tempShown}`
      : `; the unfinished file was removed${keepHint}`;
  const state = out.targetState();
  return `${out.plan.option} ${out.plan.shown}: ${e.reason} while writing ${what} (${sizes})${left}${state ? `; ${state}` : ''}`;
}

/**
 * Write a whole file in one go (a report, a difference file, an index): lock, temporary file,
 * write, commit; on any failure the temporary file is removed and the target left as it was.
 */
export async function writeWhole(plan: OutputPlan, write: (sink: OutputFile) => Promise<void> | void): Promise<void> {
  if (plan.needBytes !== undefined) checkSpace(plan, plan.needBytes);
  const out = OutputFile.open(plan);
  try {
    out.create();
    await write(out);
    out.commit();
  } catch (e) {
    out.discard(false);
    throw e;
  }
}
