// The run library: saved runs in the browser's IndexedDB, through idb.
//
// Two object stores, both keyed by the run's id:
//   'runs'      metadata only (name, dates, notes, scenario summary, size): what the list reads;
//   'payloads'  the run itself (a RunData: scenario JSON, series, Hovmoller, snapshots, bursts).
// A save writes both in ONE readwrite transaction; any failure aborts it, so the library is left
// exactly as it was. Deleting is soft (the metadata gets deletedAt) so it can be undone during the
// session; opening the library purges runs soft-deleted earlier, so an undo lasts until the page
// is reloaded. docs/library.md describes the format and how a future version migrates it.

import { openDB, type DBSchema, type IDBPDatabase } from 'idb';
import { thinSnapshots, checkRun, withAllIntegrals, RunFileError, type RunData } from '../../model/io/run-data.ts';
import { toNetcdf } from '../../model/io/run-export.ts';
import { readRun } from '../../model/io/run-import.ts';
import { legacyRunPhysics } from '../../model/io/run-physics-file.ts';
import type { RunPhysics } from '../../model/run-physics.ts';
import { formatBytes } from '../state/frame-history.ts';

export const LIBRARY_DB = 'pycno-library';
/** Schema version of the database (IndexedDB's version number). */
export const LIBRARY_DB_VERSION = 2;
/** Format tag of a payload record; bumped when RunData changes shape. 2: the run-physics record. */
export const PAYLOAD_FORMAT = 'pycno-saved-run/2';

export interface ScenarioSummary {
  scenarioName: string;
  /** The basin as the scenario writes it. */
  basin: { lonWest: number; lonEast: number; latSouth: number; latNorth: number; resolution: string };
  /** g' (m s-2), H (m), friction time (days, null for none), dynamics: from the run's physics record. */
  reducedGravity: number;
  layerThickness: number;
  frictionDays: number | null;
  dynamics: string;
  /** One short line per wind part, e.g. "fixed 'westerly burst': patch x pulse". */
  windParts: string[];
}

export interface SavedRunMeta {
  id: string;
  name: string;
  /** When the run was saved in the library, and when it was made (null if unknown), ISO 8601. */
  savedAt: string;
  runCreatedAt: string | null;
  notes: string;
  summary: ScenarioSummary;
  version: string;
  seed: string | number;
  scenarioSha256: string;
  /** Estimated stored size, bytes. */
  sizeBytes: number;
  /** Snapshots kept: every snapshotEvery-th output record. */
  snapshotEvery: number;
  snapshots: number;
  records: number;
  firstDay: number;
  lastDay: number;
  /** Set by remove(); the run is hidden and purged at the next open unless restored. */
  deletedAt: string | null;
}

export interface PayloadRecord {
  id: string;
  format: string;
  run: RunData;
}

interface LibrarySchema extends DBSchema {
  runs: { key: string; value: SavedRunMeta };
  payloads: { key: string; value: PayloadRecord };
}

export class LibraryError extends Error {
  override name = 'LibraryError';
}

/** A save refused for lack of space; nothing was written. */
export class StorageFullError extends LibraryError {
  override name = 'StorageFullError';
  constructor(
    message: string,
    readonly neededBytes: number,
    readonly freeBytes: number | null,
  ) {
    super(message);
  }
}

export interface StorageEstimateLike {
  quota?: number;
  usage?: number;
}

export interface LibraryOptions {
  /** Database name (tests use a fresh one each). */
  dbName?: string;
  /** How much space is left; default navigator.storage.estimate() where the browser has it. */
  estimateStorage?: () => Promise<StorageEstimateLike | null>;
  /** Ids for new runs; default crypto.randomUUID(). */
  newId?: () => string;
  /** The clock for savedAt / deletedAt. */
  now?: () => Date;
}

export interface SaveOptions {
  /** Keep the fields of every k-th output record (the first included). Default 1: all. */
  snapshotEvery?: number;
  /** Name in the list (default: the scenario's name). */
  name?: string;
  notes?: string;
}

// --- sizes ------------------------------------------------------------------------------------

function textBytes(s: string): number {
  // UTF-16 in most engines' stores; an upper bound that keeps the estimate on the safe side.
  return 2 * s.length;
}

/**
 * Bytes a run takes in the library when every `snapshotEvery`-th snapshot is kept: typed arrays
 * at their size, texts at two bytes a character, plus the metadata. An estimate, shown before
 * saving; browsers add their own overhead (and some compress).
 */
export function estimateSize(run: RunData, snapshotEvery = 1): number {
  let b = 2048; // metadata record, keys, small values
  b +=
    textBytes(run.scenarioJson) +
    textBytes(run.name) +
    textBytes(run.description) +
    textBytes(JSON.stringify(run.bursts));
  b += run.grid.lon.byteLength + run.grid.lat.byteLength + run.grid.ocean.byteLength;
  b += run.days.byteLength + run.steps.byteLength;
  for (const a of Object.values(run.integrals)) b += a.byteLength;
  for (const h of run.hovmoller) b += h.values.byteLength + 16;
  for (const p of run.probes) {
    b += textBytes(p.name) + 16;
    for (const a of Object.values(p.series)) if (a) b += a.byteLength;
  }
  for (const s of thinSnapshots(run, snapshotEvery)) {
    b += 16;
    for (const a of Object.values(s.fields)) if (a) b += a.byteLength;
  }
  return b;
}

// --- scenario summary -------------------------------------------------------------------------

type Json = Record<string, unknown>;
const obj = (x: unknown): Json => (x !== null && typeof x === 'object' && !Array.isArray(x) ? (x as Json) : {});
const num = (x: unknown): number => (typeof x === 'number' ? x : NaN);

function partLine(p: unknown): string {
  const part = obj(p);
  const name = typeof part.name === 'string' ? ` '${part.name}'` : '';
  const off = part.enabled === false ? ' (off)' : '';
  if (part.kind === 'fixed') {
    const src = obj(part.source);
    const pattern = src.kind === 'shaped' ? String(obj(src.shape).kind ?? 'shaped') : String(src.kind ?? '?');
    return `fixed${name}: ${pattern} x ${String(obj(part.envelope).kind ?? '?')}${off}`;
  }
  return `${String(part.kind ?? '?')}${name}${off}`;
}

/** What the run list shows of a run: the scenario's name, basin and wind parts as written, the physics from its record. */
export function scenarioSummary(scenarioJson: string, physics: RunPhysics): ScenarioSummary {
  let s: Json;
  try {
    s = obj(JSON.parse(scenarioJson));
  } catch (e) {
    throw new LibraryError(`the run's scenario JSON does not parse: ${(e as Error).message}`);
  }
  const basin = obj(s.basin);
  const res = basin.resolution;
  const resolution = typeof res === 'number' ? `${res}°` : `${num(obj(res).lon)}° x ${num(obj(res).lat)}°`;
  return {
    scenarioName: typeof s.name === 'string' ? s.name : '',
    basin: {
      lonWest: num(basin.lonWest),
      lonEast: num(basin.lonEast),
      latSouth: num(basin.latSouth),
      latNorth: num(basin.latNorth),
      resolution,
    },
    reducedGravity: physics.reducedGravity,
    layerThickness: physics.layerThickness,
    frictionDays: physics.frictionDays,
    dynamics: physics.dynamics,
    windParts: (Array.isArray(obj(s.wind).parts) ? (obj(s.wind).parts as unknown[]) : []).map(partLine),
  };
}

// --- older payloads ---------------------------------------------------------------------------

/** A format-1 payload in format 2, or null when it cannot be (it is left for get() to refuse by name). */
export function payloadToFormat2(p: PayloadRecord): PayloadRecord | null {
  if (p.format !== 'pycno-saved-run/1') return null;
  const old = p.run as RunData & {
    reducedGravity?: unknown;
    layerThickness?: unknown;
    beta?: unknown;
    dynamics?: unknown;
  };
  if (typeof old.reducedGravity !== 'number' || typeof old.layerThickness !== 'number') return null;
  try {
    const physics = legacyRunPhysics(
      {
        reducedGravity: old.reducedGravity,
        layerThickness: old.layerThickness,
        beta: typeof old.beta === 'number' ? old.beta : undefined,
        dynamics: typeof old.dynamics === 'string' ? old.dynamics : undefined,
      },
      old.scenarioJson,
    );
    const { reducedGravity: _g, layerThickness: _h, beta: _b, dynamics: _d, ...rest } = old;
    return { ...p, format: PAYLOAD_FORMAT, run: { ...rest, physics } };
  } catch {
    return null;
  }
}

// --- errors -----------------------------------------------------------------------------------

function errorName(e: unknown): string {
  return e !== null && typeof e === 'object' && 'name' in e ? String((e as { name: unknown }).name) : '';
}

function isQuota(e: unknown): boolean {
  const n = errorName(e);
  // Older engines report a full store as error code 22 or under Firefox's own name.
  return n === 'QuotaExceededError' || n === 'NS_ERROR_DOM_QUOTA_REACHED' || (e as { code?: unknown })?.code === 22;
}

function describeError(e: unknown): string {
  if (e instanceof Error) return `${e.name}: ${e.message}`;
  return String(e);
}

// --- the library ------------------------------------------------------------------------------

export class RunLibrary {
  private constructor(
    private readonly db: IDBPDatabase<LibrarySchema>,
    private readonly options: Required<Pick<LibraryOptions, 'newId' | 'now'>> & LibraryOptions,
  ) {}

  /** Open (creating or upgrading) the library and purge runs soft-deleted in earlier sessions. */
  static async open(options: LibraryOptions = {}): Promise<RunLibrary> {
    let db: IDBPDatabase<LibrarySchema>;
    try {
      db = await openDB<LibrarySchema>(options.dbName ?? LIBRARY_DB, LIBRARY_DB_VERSION, {
        async upgrade(database, oldVersion, _newVersion, tx) {
          // One step per version, rewriting records through the upgrade transaction (docs/library.md).
          if (oldVersion < 1) {
            database.createObjectStore('runs', { keyPath: 'id' });
            database.createObjectStore('payloads', { keyPath: 'id' });
          }
          if (oldVersion === 1) {
            // Format 1 -> 2: the run-physics record in place of g', H, beta and dynamics.
            for (let c = await tx.objectStore('payloads').openCursor(); c; c = await c.continue()) {
              const p = payloadToFormat2(c.value);
              if (p) await c.update(p);
            }
          }
        },
      });
    } catch (e) {
      throw new LibraryError(
        `the run library cannot be opened (${describeError(e)}); is storage blocked for this page (private window, or site data turned off)?`,
      );
    }
    const lib = new RunLibrary(db, {
      ...options,
      newId: options.newId ?? (() => crypto.randomUUID()),
      now: options.now ?? (() => new Date()),
    });
    await lib.purgeDeleted();
    return lib;
  }

  close(): void {
    this.db.close();
  }

  /** Saved runs, newest first, metadata only (deleted ones left out unless asked for). */
  async list(options: { includeDeleted?: boolean } = {}): Promise<SavedRunMeta[]> {
    const all = await this.db.getAll('runs');
    return all
      .filter((m) => options.includeDeleted || m.deletedAt === null)
      .sort((a, b) => (a.savedAt < b.savedAt ? 1 : a.savedAt > b.savedAt ? -1 : a.id < b.id ? 1 : -1));
  }

  async meta(id: string): Promise<SavedRunMeta> {
    const m = await this.db.get('runs', id);
    if (!m) throw new LibraryError(`no saved run with id ${id}`);
    return m;
  }

  /** The saved run (its snapshots are those that were kept). */
  async get(id: string): Promise<RunData> {
    const tx = this.db.transaction(['runs', 'payloads'], 'readonly');
    const [m, p] = await Promise.all([tx.objectStore('runs').get(id), tx.objectStore('payloads').get(id), tx.done]);
    if (!m) throw new LibraryError(`no saved run with id ${id}`);
    if (!p) throw new LibraryError(`saved run '${m.name}' (${id}) has no data record; the library is damaged`);
    if (p.format !== PAYLOAD_FORMAT)
      throw new LibraryError(
        `saved run '${m.name}' is in format ${p.format}, which this version (${PAYLOAD_FORMAT}) does not read`,
      );
    return withAllIntegrals(p.run);
  }

  /**
   * Save a run: metadata and payload in one transaction. Throws StorageFullError (nothing
   * written) when the browser's storage is full, LibraryError for other failures (nothing
   * written either).
   */
  async save(run: RunData, options: SaveOptions = {}): Promise<SavedRunMeta> {
    const every = options.snapshotEvery ?? 1;
    if (!Number.isInteger(every) || every < 1)
      throw new LibraryError(`snapshot interval must be a whole number of output records >= 1 (got ${every})`);
    try {
      checkRun(run);
    } catch (e) {
      if (e instanceof RunFileError) throw new LibraryError(`not saved: ${e.message}`);
      throw e;
    }
    const kept = every === 1 ? run.snapshots : thinSnapshots(run, every);
    const stored: RunData = { ...run, snapshots: kept };
    const id = this.options.newId();
    const sizeBytes = estimateSize(run, every);
    const meta: SavedRunMeta = {
      id,
      name: (options.name ?? run.name).trim() || run.name || 'unnamed run',
      savedAt: this.options.now().toISOString(),
      runCreatedAt: run.createdAt,
      notes: options.notes ?? '',
      summary: scenarioSummary(run.scenarioJson, run.physics),
      version: run.version,
      seed: run.seed,
      scenarioSha256: run.scenarioSha256,
      sizeBytes,
      snapshotEvery: every,
      snapshots: kept.length,
      records: run.days.length,
      firstDay: run.days[0],
      lastDay: run.days[run.days.length - 1],
      deletedAt: null,
    };
    await this.writeBoth(meta, { id, format: PAYLOAD_FORMAT, run: stored }, sizeBytes);
    return meta;
  }

  private async writeBoth(meta: SavedRunMeta, payload: PayloadRecord, sizeBytes: number): Promise<void> {
    const tx = this.db.transaction(['runs', 'payloads'], 'readwrite');
    // Swallow the done promise's own rejection here; the error is handled below.
    const done = tx.done.then(
      () => null,
      (e: unknown) => e ?? tx.error ?? new Error('transaction aborted'),
    );
    let failure: unknown = null;
    try {
      // Payload first: even a reader outside this transaction never sees metadata without data.
      await tx.objectStore('payloads').put(payload);
      await tx.objectStore('runs').put(meta);
    } catch (e) {
      failure = e;
      try {
        tx.abort(); // a put that throws does not abort by itself: the earlier put would commit
      } catch {
        /* already finished or aborting */
      }
    }
    const ended = await done;
    const err = failure ?? ended;
    if (err === null) return;
    if (isQuota(err) || isQuota(tx.error)) throw await this.fullError(sizeBytes);
    throw new LibraryError(`not saved (nothing was written): ${describeError(err)}`);
  }

  private async fullError(needed: number): Promise<StorageFullError> {
    let free: number | null = null;
    try {
      const est = await (this.options.estimateStorage ?? defaultEstimate)();
      if (est && typeof est.quota === 'number' && typeof est.usage === 'number')
        free = Math.max(0, est.quota - est.usage);
    } catch {
      free = null;
    }
    const freeText = free === null ? 'the browser does not say how much is free' : `about ${formatBytes(free)} free`;
    return new StorageFullError(
      `not saved: the browser's storage is full (needs ${formatBytes(needed)}, ${freeText}); delete old runs or save fewer snapshots`,
      needed,
      free,
    );
  }

  private async updateMeta(id: string, change: (m: SavedRunMeta) => void): Promise<SavedRunMeta> {
    const tx = this.db.transaction('runs', 'readwrite');
    const m = await tx.store.get(id);
    if (!m) {
      await tx.done;
      throw new LibraryError(`no saved run with id ${id}`);
    }
    change(m);
    await tx.store.put(m);
    await tx.done;
    return m;
  }

  async rename(id: string, name: string): Promise<SavedRunMeta> {
    const n = name.trim();
    if (!n) throw new LibraryError('a saved run needs a name (got an empty one)');
    return this.updateMeta(id, (m) => (m.name = n));
  }

  async setNotes(id: string, notes: string): Promise<SavedRunMeta> {
    return this.updateMeta(id, (m) => (m.notes = notes));
  }

  /** Hide a run; undoRemove() brings it back until the library is next opened. */
  async remove(id: string): Promise<SavedRunMeta> {
    return this.updateMeta(id, (m) => (m.deletedAt = this.options.now().toISOString()));
  }

  async undoRemove(id: string): Promise<SavedRunMeta> {
    return this.updateMeta(id, (m) => {
      if (m.deletedAt === null) throw new LibraryError(`saved run '${m.name}' is not deleted`);
      m.deletedAt = null;
    });
  }

  /** Remove soft-deleted runs for good (both records, one transaction). */
  async purgeDeleted(): Promise<number> {
    const tx = this.db.transaction(['runs', 'payloads'], 'readwrite');
    const runs = tx.objectStore('runs');
    const gone = (await runs.getAll()).filter((m) => m.deletedAt !== null);
    for (const m of gone) {
      await runs.delete(m.id);
      await tx.objectStore('payloads').delete(m.id);
    }
    await tx.done;
    return gone.length;
  }

  /** The run's scenario as a new scenario to edit: the exact JSON, renamed if a name is given. */
  async duplicateScenario(id: string, newName?: string): Promise<string> {
    const run = await this.get(id);
    if (newName === undefined) return run.scenarioJson;
    const s = JSON.parse(run.scenarioJson) as Json;
    s.name = newName;
    return JSON.stringify(s, null, 2) + '\n';
  }

  /** The saved run as a CF-NetCDF file, written by the command line's writer. */
  async exportNetcdf(id: string): Promise<Uint8Array> {
    return toNetcdf(await this.get(id));
  }

  /**
   * Read a Pycno run NetCDF (e.g. from a headless run) and save it with every snapshot in it.
   * Throws LibraryError naming the file for files that are not Pycno run files or are damaged.
   */
  async importNetcdf(
    bytes: Uint8Array,
    fileName: string,
    options: Omit<SaveOptions, 'snapshotEvery'> = {},
  ): Promise<SavedRunMeta> {
    let run: RunData;
    try {
      run = readRun(bytes, fileName);
    } catch (e) {
      if (e instanceof RunFileError) throw new LibraryError(`not imported: ${e.message}`);
      throw e;
    }
    return this.save(run, options);
  }
}

async function defaultEstimate(): Promise<StorageEstimateLike | null> {
  const nav = (globalThis as { navigator?: { storage?: { estimate?: () => Promise<StorageEstimateLike> } } }).navigator;
  return nav?.storage?.estimate ? nav.storage.estimate() : null;
}
