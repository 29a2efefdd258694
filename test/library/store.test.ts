// The run library on IndexedDB (fake-indexeddb in Node): round trips, edits, deletion with undo,
// failures that leave the library as it was, a full store, export and import.

import 'fake-indexeddb/auto';
import { openDB } from 'idb';
import { afterEach, describe, expect, it } from 'vitest';
import type { RunData } from '../../model/io/run-data.ts';
import { toNetcdf } from '../../model/io/run-export.ts';
import { readRun } from '../../model/io/run-import.ts';
import {
  LibraryError,
  RunLibrary,
  StorageFullError,
  estimateSize,
  type LibraryOptions,
} from '../../viewer/library/store.ts';
import { expectSameRun, tinyRun } from '../support/run-fixture.ts';

let dbCount = 0;
const opened: RunLibrary[] = [];

async function library(options: LibraryOptions = {}): Promise<RunLibrary & { dbName: string }> {
  const dbName = options.dbName ?? `test-library-${++dbCount}`;
  const lib = await RunLibrary.open({ ...options, dbName });
  opened.push(lib);
  return Object.assign(lib, { dbName });
}

/** The raw contents of both object stores, read past the library's own code. */
async function raw(dbName: string): Promise<{ runs: string[]; payloads: string[] }> {
  const db = await openDB(dbName);
  const runs = (await db.getAllKeys('runs')).map(String).sort();
  const payloads = (await db.getAllKeys('payloads')).map(String).sort();
  db.close();
  return { runs, payloads };
}

/** Make IDBObjectStore.put throw for one store, as a browser does when the write fails. */
function failPutsTo(storeName: string, error: () => Error): () => void {
  const proto = IDBObjectStore.prototype;
  const original = proto.put;
  proto.put = function (this: IDBObjectStore, ...args: Parameters<IDBObjectStore['put']>) {
    if (this.name === storeName) throw error();
    return original.apply(this, args);
  };
  return () => {
    proto.put = original;
  };
}

afterEach(() => {
  for (const l of opened.splice(0)) l.close();
});

describe('run library', () => {
  it('save, list and get give back every value', async () => {
    const lib = await library();
    const run = await tinyRun();
    const meta = await lib.save(run, { notes: 'first try' });
    const list = await lib.list();
    expect(list).toHaveLength(1);
    expect(list[0]).toEqual(meta);
    expect(meta.name).toBe('Tiny westerly patch');
    expect(meta.notes).toBe('first try');
    expect(meta.records).toBe(7);
    expect(meta.snapshots).toBe(7);
    expect(meta.summary).toMatchObject({
      reducedGravity: 0.03,
      layerThickness: 150,
      frictionDays: 365,
      windParts: ["fixed 'westerly patch': patch x pulse"],
    });
    expect(meta.summary.basin).toEqual({ lonWest: 150, lonEast: 190, latSouth: -10, latNorth: 10, resolution: '1°' });
    expect(meta.seed).toBe(11);
    expect(meta.sizeBytes).toBe(estimateSize(run, 1));
    expectSameRun(run, await lib.get(meta.id));
  });

  it('keeps the snapshots asked for and sizes them before saving', async () => {
    const lib = await library();
    const run = await tinyRun();
    const all = estimateSize(run, 1);
    const third = estimateSize(run, 3);
    const oneSnapshot = 40 * 20 * 4 * run.fields.length;
    // 7 snapshots against 3 (records 0, 3, 6): four fewer.
    expect(all - third).toBe(4 * (oneSnapshot + 16));
    const meta = await lib.save(run, { snapshotEvery: 3 });
    expect(meta.snapshots).toBe(3);
    const back = await lib.get(meta.id);
    expect(back.snapshots.map((s) => s.index)).toEqual([0, 3, 6]);
    expectSameRun({ ...run, snapshots: run.snapshots.filter((s) => s.index % 3 === 0) }, back);
    await expect(lib.save(run, { snapshotEvery: 0 })).rejects.toThrow(/whole number of output records >= 1/);
  });

  it('rename, notes, delete and undo; a purge at the next open', async () => {
    const lib = await library();
    const a = await lib.save(await tinyRun(), { name: 'A' });
    const b = await lib.save(await tinyRun(['physics.frictionDays=30']), { name: 'B' });
    await lib.rename(a.id, '  friction 365 d ');
    await lib.setNotes(b.id, 'friction 30 days');
    expect((await lib.meta(a.id)).name).toBe('friction 365 d');
    expect((await lib.meta(b.id)).notes).toBe('friction 30 days');
    await expect(lib.rename(a.id, '   ')).rejects.toThrow(/needs a name/);
    await expect(lib.rename('nope', 'x')).rejects.toThrow(/no saved run with id nope/);

    await lib.remove(a.id);
    expect((await lib.list()).map((m) => m.name)).toEqual(['B']);
    expect((await lib.list({ includeDeleted: true })).length).toBe(2);
    await lib.undoRemove(a.id);
    expect((await lib.list()).map((m) => m.id).sort()).toEqual([a.id, b.id].sort());
    await expect(lib.undoRemove(a.id)).rejects.toThrow(/is not deleted/);

    await lib.remove(b.id);
    lib.close();
    const again = await library({ dbName: lib.dbName });
    expect((await again.list({ includeDeleted: true })).map((m) => m.id)).toEqual([a.id]);
    expect(await raw(lib.dbName)).toEqual({ runs: [a.id], payloads: [a.id] });
  });

  it('duplicate as a new scenario returns the exact JSON, or renamed', async () => {
    const lib = await library();
    const run = await tinyRun();
    const meta = await lib.save(run);
    expect(await lib.duplicateScenario(meta.id)).toBe(run.scenarioJson);
    const copy = JSON.parse(await lib.duplicateScenario(meta.id, 'Tiny, again'));
    expect(copy.name).toBe('Tiny, again');
    expect({ ...copy, name: run.name }).toEqual(JSON.parse(run.scenarioJson));
  });

  it('a write that fails mid-transaction leaves earlier runs and no partial record', async () => {
    const lib = await library();
    const first = await lib.save(await tinyRun(), { name: 'kept' });
    const before = await raw(lib.dbName);
    // The payload put succeeds, then the metadata put fails: the payload must not stay.
    const restore = failPutsTo('runs', () => new DOMException('the disk went away', 'UnknownError'));
    try {
      await expect(lib.save(await tinyRun(), { name: 'lost' })).rejects.toThrow(
        /^not saved \(nothing was written\): UnknownError: the disk went away/,
      );
    } finally {
      restore();
    }
    expect(await raw(lib.dbName)).toEqual(before);
    expect((await lib.list()).map((m) => m.name)).toEqual(['kept']);
    expectSameRun(await tinyRun(), await lib.get(first.id));
  });

  it('a payload the store cannot hold (not cloneable) writes nothing', async () => {
    const lib = await library();
    await lib.save(await tinyRun(), { name: 'kept' });
    const before = await raw(lib.dbName);
    const run = await tinyRun();
    const bad = { ...run, bursts: [(() => 0) as never] } as RunData;
    await expect(lib.save(bad)).rejects.toThrow(/^not saved \(nothing was written\): DataCloneError/);
    expect(await raw(lib.dbName)).toEqual(before);
  });

  it('a full store gives the message and nothing partial', async () => {
    const lib = await library({ estimateStorage: async () => ({ quota: 50e6, usage: 38e6 }) });
    const kept = await lib.save(await tinyRun(), { name: 'kept' });
    const before = await raw(lib.dbName);
    const run = await tinyRun();
    const restore = failPutsTo('runs', () => new DOMException('quota', 'QuotaExceededError'));
    let err: unknown;
    try {
      await lib.save(run);
    } catch (e) {
      err = e;
    } finally {
      restore();
    }
    expect(err).toBeInstanceOf(StorageFullError);
    const need = estimateSize(run, 1);
    expect((err as StorageFullError).neededBytes).toBe(need);
    expect((err as Error).message).toBe(
      `not saved: the browser's storage is full (needs ${Math.round(need / 1e3)} kB, about 12 MB free); delete old runs or save fewer snapshots`,
    );
    expect(await raw(lib.dbName)).toEqual(before);
    expect((await lib.list()).map((m) => m.id)).toEqual([kept.id]);
  });

  it('a full store in a browser that does not say what is free', async () => {
    const lib = await library({ estimateStorage: async () => null });
    const restore = failPutsTo('payloads', () => new DOMException('quota', 'QuotaExceededError'));
    try {
      await expect(lib.save(await tinyRun())).rejects.toThrow(
        /storage is full \(needs \d+ kB, the browser does not say how much is free\)/,
      );
    } finally {
      restore();
    }
    expect(await raw(lib.dbName)).toEqual({ runs: [], payloads: [] });
  });

  it('export -> import keeps every value bit for bit; other files are refused', async () => {
    const lib = await library();
    const run = await tinyRun([], 2);
    const meta = await lib.save(run);
    const bytes = await lib.exportNetcdf(meta.id);
    expect(Buffer.from(bytes).equals(Buffer.from(await toNetcdf(run)))).toBe(true);
    const imported = await lib.importNetcdf(bytes, 'tiny.nc', { name: 'from file' });
    expect(imported.name).toBe('from file');
    expect(imported.snapshots).toBe(4);
    expectSameRun(run, await lib.get(imported.id));
    expectSameRun(readRun(bytes), await lib.get(imported.id));
    const before = await raw(lib.dbName);
    await expect(lib.importNetcdf(new TextEncoder().encode('hello'), 'notes.txt')).rejects.toThrow(
      /^not imported: notes\.txt: not a NetCDF file/,
    );
    await expect(lib.importNetcdf(bytes.slice(0, bytes.length - 100), 'cut.nc')).rejects.toThrow(LibraryError);
    expect(await raw(lib.dbName)).toEqual(before);
  });
});

describe('a library of the first version', () => {
  it('opens with its runs moved to format 2: the physics record from what each kept and its scenario', async () => {
    const dbName = `test-library-${++dbCount}`;
    const run = await tinyRun(['physics.frictionDays=90']);
    // A run as version 1 saved it: g', H, beta and dynamics beside the scenario, no record.
    const { physics, ...rest } = run;
    const v1Run = {
      ...rest,
      dynamics: physics.dynamics,
      reducedGravity: physics.reducedGravity,
      layerThickness: physics.layerThickness,
      beta: physics.beta,
    };
    const v1 = await openDB(dbName, 1, {
      upgrade(db) {
        db.createObjectStore('runs', { keyPath: 'id' });
        db.createObjectStore('payloads', { keyPath: 'id' });
      },
    });
    const meta = {
      id: 'old',
      name: 'old run',
      savedAt: '2030-01-01T00:00:00.000Z',
      runCreatedAt: null,
      notes: '',
      summary: {},
      version: '0.1.0',
      seed: 11,
      scenarioSha256: run.scenarioSha256,
      sizeBytes: 1,
      snapshotEvery: 1,
      snapshots: run.snapshots.length,
      records: run.days.length,
      firstDay: 0,
      lastDay: 6,
      deletedAt: null,
    };
    await v1.put('runs', meta);
    await v1.put('payloads', { id: 'old', format: 'pycno-saved-run/1', run: v1Run });
    // One that cannot move (its scenario is not JSON) stays as it was, and is refused by name.
    await v1.put('runs', { ...meta, id: 'broken', name: 'broken run' });
    await v1.put('payloads', {
      id: 'broken',
      format: 'pycno-saved-run/1',
      run: { ...v1Run, scenarioJson: '{ not json' },
    });
    v1.close();
    const lib = await library({ dbName });
    const got = await lib.get('old');
    expect(got.physics).toEqual(physics);
    expect('reducedGravity' in got).toBe(false);
    expectSameRun(run, got);
    await expect(lib.get('broken')).rejects.toThrow(
      /saved run 'broken run' is in format pycno-saved-run\/1, which this version \(pycno-saved-run\/2\) does not read/,
    );
  });
});
