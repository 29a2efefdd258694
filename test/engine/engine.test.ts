import { MessageChannel } from 'node:worker_threads';
import { describe, expect, it } from 'vitest';
import { buildModel } from '../../model/scenario/build.ts';
import { parseScenario } from '../../model/scenario/load-inputs.ts';
import { Engine } from '../../worker/engine.ts';
import { transferList } from '../../worker/frames.ts';
import type { Frame } from '../../worker/protocol.ts';
import { BLOW_UP_SETS, FIXTURE, FIXTURE_TEXT, fakeHost } from '../support/engine-fixture.ts';

// Many output intervals of about one step each: far more samples than frames fit in the time.
const MANY_SAMPLES = ['basin.resolution=0.25', 'time.days=20', 'time.outputEveryDays=0.1'];

async function loaded(engine: Engine, sets: string[] = []) {
  const r = await engine.load(FIXTURE_TEXT, FIXTURE, { sets });
  if (!r.ok) throw new Error(r.error.message);
  return r.scenario;
}

function collect(engine: Engine): Array<{ frame: Frame; transfer: ArrayBuffer[] }> {
  const got: Array<{ frame: Frame; transfer: ArrayBuffer[] }> = [];
  engine.onFrame((frame, transfer) => got.push({ frame, transfer }));
  return got;
}

describe('engine frames', () => {
  it('publishes at most 30 frames per second of wall clock and never drops a sample', async () => {
    const host = fakeHost(1);
    const engine = new Engine({ host, maxFramesPerSecond: 30 });
    const info = await loaded(engine, MANY_SAMPLES);
    const frames = collect(engine);
    const t0 = host.t;
    engine.start();
    const end = await engine.idle();
    expect(end.status).toBe('finished');
    const elapsed = host.t - t0;
    const samples = frames.flatMap((f) => f.frame.samples);
    const outputs = Math.floor(info.days / info.outputEveryDays + 1e-9) + 1;
    expect(samples.length).toBe(outputs);
    expect(end.samples).toBe(outputs);
    // In order, each once.
    for (let k = 1; k < samples.length; k++) expect(samples[k].day).toBeGreaterThan(samples[k - 1].day);
    // The bound: one frame per 1000/30 ms, plus the last frame of the run.
    expect(frames.length).toBeLessThanOrEqual(Math.floor(elapsed / (1000 / 30)) + 2);
    expect(frames.length).toBeLessThan(samples.length / 3);
    expect(frames.at(-1)!.frame.finished).toBe(true);
    expect(frames.slice(0, -1).every((f) => !f.frame.finished)).toBe(true);
  });

  it('spaces frames so that building and posting them takes at most a fifth of the time', async () => {
    // The listener stands for an expensive frame (a big grid): 20 ms of clock each. At 30 frames
    // per second (one per 33 ms) frames would take most of the time; the engine spaces them out.
    const host = fakeHost(1);
    const engine = new Engine({ host, maxFramesPerSecond: 30 });
    await loaded(engine, [...MANY_SAMPLES, 'time.days=40']);
    const starts: number[] = [];
    let inFrames = 0;
    engine.onFrame(() => {
      starts.push(host.t);
      host.t += 20;
      inFrames += 20;
    });
    const t0 = host.t;
    engine.start();
    const end = await engine.idle();
    expect(end.status).toBe('finished');
    expect(starts.length).toBeGreaterThan(5);
    // Between frames (not before the run's last frame, which goes out when the run ends).
    const gaps = starts.slice(1, -1).map((t, k) => t - starts[k]);
    expect(gaps.length).toBeGreaterThan(5);
    for (const g of gaps) expect(g).toBeGreaterThanOrEqual(5 * 20 * 0.95);
    expect(inFrames / (host.t - t0)).toBeLessThan(0.3);
  });

  it('lists every typed-array buffer of a frame for transfer, and the transfer detaches them', async () => {
    const engine = new Engine({ host: fakeHost(5) });
    const info = await loaded(engine);
    const frames = collect(engine);
    engine.start();
    await engine.idle();
    const { frame, transfer } = frames.find((f) => f.frame.samples.length > 0)!;
    const nSampleArrays = frame.samples.length * (info.hovmollerLats.length + info.probes.length);
    expect(transfer.length).toBe(info.fields.length + nSampleArrays);
    expect(new Set(transfer).size).toBe(transfer.length);
    for (const f of info.fields) {
      expect(frame.fields[f]).toBeInstanceOf(Float32Array);
      expect(frame.fields[f]!.length).toBe(info.grid.nx * info.grid.ny);
      expect(transfer).toContain(frame.fields[f]!.buffer);
    }
    const channel = new MessageChannel();
    const received = new Promise<Frame>((r) => channel.port2.once('message', r));
    channel.port1.postMessage(frame, transfer);
    const copy = await received;
    channel.port1.close();
    expect(frame.fields.h_anom!.byteLength).toBe(0); // moved, not cloned
    expect(copy.fields.h_anom!.length).toBe(info.grid.nx * info.grid.ny);
    expect(transferList(copy).length).toBe(transfer.length);
  });

  it('gives the same fields as driving the model directly, bit for bit', async () => {
    const engine = new Engine({ host: fakeHost(3) });
    const info = await loaded(engine, ['basin.resolution=0.5']);
    const frames = collect(engine);
    engine.start();
    await engine.idle();
    const last = frames.at(-1)!.frame;

    const parsed = parseScenario(FIXTURE_TEXT, FIXTURE, ['basin.resolution=0.5']);
    const { model } = buildModel(parsed.resolved);
    model.advance(last.step);
    for (const f of info.fields) {
      const direct = model.field(f, new Float32Array(info.grid.nx * info.grid.ny));
      expect(Buffer.from(last.fields[f]!.buffer).equals(Buffer.from(direct.buffer))).toBe(true);
    }
    expect(last.integrals).toEqual(model.integrals());
    // Samples: the day-k integrals equal a direct run to the same step.
    const samples = frames.flatMap((f) => f.frame.samples);
    const { model: m2 } = buildModel(parsed.resolved);
    const k = 3;
    m2.advance(Math.round((k * info.outputEveryDays * 86400) / m2.dt));
    expect(samples[k].integrals).toEqual(m2.integrals());
  });
});

describe('engine controls', () => {
  it('stepOutput runs exactly one output interval and pauses', async () => {
    const engine = new Engine({ host: fakeHost(2) });
    const info = await loaded(engine);
    const frames = collect(engine);
    let r = await engine.stepOutput();
    expect(r.status).toBe('paused');
    expect(r.samples).toBe(1);
    expect(r.day).toBe(0);
    r = await engine.stepOutput();
    expect(r.status).toBe('paused');
    expect(r.samples).toBe(2);
    expect(Math.abs(r.day - info.outputEveryDays)).toBeLessThan(info.dt / 86400);
    const samples = frames.flatMap((f) => f.frame.samples);
    expect(samples.map((s) => s.day)).toEqual([0, r.day]);
    expect(frames.at(-1)!.frame.day).toBe(r.day);
  });

  it('pause stops mid-run, start resumes, and the result matches an uninterrupted run', async () => {
    const host = fakeHost(1);
    const engine = new Engine({ host, sliceMs: 1 });
    await loaded(engine, MANY_SAMPLES);
    const frames = collect(engine);
    let paused = false;
    engine.onFrame(() => {
      if (!paused) {
        paused = true;
        engine.pause();
      }
    });
    engine.start();
    const mid = await engine.idle();
    expect(mid.status).toBe('paused');
    expect(mid.day).toBeLessThan(mid.endDay);
    engine.start();
    const end = await engine.idle();
    expect(end.status).toBe('finished');

    const ref = new Engine({ host: fakeHost(1) });
    await loaded(ref, MANY_SAMPLES);
    const refFrames = collect(ref);
    ref.start();
    await ref.idle();
    const a = frames.flatMap((f) => f.frame.samples);
    const b = refFrames.flatMap((f) => f.frame.samples);
    expect(a.map((s) => s.day)).toEqual(b.map((s) => s.day));
    expect(a.map((s) => s.integrals)).toEqual(b.map((s) => s.integrals));
    expect(frames.at(-1)!.frame.fields.h_anom).toEqual(refFrames.at(-1)!.frame.fields.h_anom);
  });

  it('stop goes back to the start; a new run repeats the first', async () => {
    const engine = new Engine({ host: fakeHost(2) });
    await loaded(engine);
    const first = collect(engine);
    engine.start();
    await engine.idle();
    const r = await engine.stop();
    expect(r.status).toBe('ready');
    expect(r.step).toBe(0);
    expect(engine.currentFrame()!.integrals.energy).toBe(0);
    const second = collect(engine);
    engine.start();
    expect((await engine.idle()).status).toBe('finished');
    expect(second.at(-1)!.frame.fields.u).toEqual(first.at(-1)!.frame.fields.u);
  });

  it('a blow-up fails the run with its message; the engine loads and runs again afterwards', async () => {
    const engine = new Engine({ host: fakeHost(2) });
    await loaded(engine, BLOW_UP_SETS);
    const statuses: string[] = [];
    engine.onStatus((s) => statuses.push(s.status));
    engine.start();
    const end = await engine.idle();
    expect(end.status).toBe('failed');
    expect(end.error!.kind).toBe('blow-up');
    expect(end.error!.message).toMatch(/^the run blew up on day \d+\.\d\d at .*the upper layer vanished/);
    expect(statuses.at(-1)).toBe('failed');
    engine.start(); // refused: a failed run does not continue
    expect(engine.status().status).toBe('failed');
    await loaded(engine);
    engine.start();
    expect((await engine.idle()).status).toBe('finished');
  });

  it('bad input comes back as an input error with the command line text', async () => {
    const engine = new Engine({ host: fakeHost(2) });
    const r = await engine.load(FIXTURE_TEXT.replace('"reducedGravity": 0.03', '"reducedGravity": -0.03'), 'tiny.json');
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.error.kind).toBe('input');
    expect(r.error.message.split('\n')[0]).toMatch(
      /^tiny\.json: line 13: physics\.reducedGravity: must be > 0 \(got -0\.03\)/,
    );
    expect(engine.status().status).toBe('empty');
    const missing = await engine.load(
      FIXTURE_TEXT.replace(
        '"kind": "shaped", "shape": { "kind": "patch", "lon": 160, "lat": 0, "lonWidth": 5, "latWidth": 3 }, "x": 0.1, "y": 0',
        '"kind": "file", "path": "winds.csv", "format": "csv"',
      ),
      'dir/tiny.json',
    );
    expect(missing.ok).toBe(false);
    if (!missing.ok) expect(missing.error.message).toContain('cannot read the wind file dir/winds.csv');
  });

  it('caps the speed in model days per wall-clock second', async () => {
    const host = fakeHost(1);
    const engine = new Engine({ host });
    const info = await loaded(engine);
    engine.setSpeed(2);
    const t0 = host.t;
    engine.start();
    const end = await engine.idle();
    expect(end.status).toBe('finished');
    // 6 days at 2 days/s take at least about 3 s of (fake) wall clock; flat out they take ms.
    expect(host.t - t0).toBeGreaterThan(((end.day - info.dt / 86400) / 2) * 1000);
    const fastHost = fakeHost(1);
    const fast = new Engine({ host: fastHost });
    await loaded(fast);
    const t1 = fastHost.t;
    fast.start();
    await fast.idle();
    expect(fastHost.t - t1).toBeLessThan(1000);
  });
});

describe('Hovmoller latitudes added during a run', () => {
  it('are sampled from the next output on, along the nearest row, and kept across stop-and-reset', async () => {
    const engine = new Engine({ host: fakeHost(2) });
    const info = await loaded(engine);
    const before = info.hovmollerLats.length;
    const frames = collect(engine);
    const added = engine.addSection(2.2);
    expect(added.ok).toBe(true);
    if (!added.ok) return;
    expect(added.index).toBe(before);
    await engine.stepOutput();
    const sample = frames.flatMap((f) => f.frame.samples).at(-1)!;
    expect(sample.hovmoller).toHaveLength(before + 1);
    // The row is h' along the grid row nearest 2.2 N, as in the full field.
    const model = engine.model!;
    const j = model.grid.nearestRow(2.2);
    expect(added.rowLat).toBe(model.grid.latCentre[j]);
    const h = model.field('h_anom', new Float32Array(model.grid.nx * model.grid.ny));
    expect(Array.from(sample.hovmoller[before])).toEqual(
      Array.from(h.subarray(j * model.grid.nx, (j + 1) * model.grid.nx)),
    );
    // The same latitude again answers with the same index; outside the basin is refused.
    expect(engine.addSection(model.grid.latCentre[j])).toEqual({ ok: true, index: before, rowLat: added.rowLat });
    const outside = engine.addSection(95);
    expect(outside.ok).toBe(false);
    await engine.stop();
    expect(engine.loaded!.hovmollerLats).toHaveLength(before + 1);
    // A new load forgets it.
    expect((await loaded(engine)).hovmollerLats).toHaveLength(before);
  });
});

describe('errors as the user sees them', () => {
  it('a wind-design mistake (a formula error) is bad input, not an internal error', async () => {
    const { FormulaError } = await import('../../model/forcing/formula.ts');
    const { toEngineError } = await import('../../worker/engine.ts');
    expect(toEngineError(new FormulaError("unknown name 'lonn' at character 1", 0))).toEqual({
      kind: 'input',
      message: "unknown name 'lonn' at character 1",
    });
  });
});
