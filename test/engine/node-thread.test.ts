// The engine in a Node worker thread through comlink's Node adapter: the second host.

import * as Comlink from 'comlink';
import { afterAll, describe, expect, it } from 'vitest';
import { startEngineThread } from '../../worker/node-host.ts';
import type { EngineReport, Frame } from '../../worker/protocol.ts';
import { Engine } from '../../worker/engine.ts';
import { FIXTURE, FIXTURE_TEXT, fakeHost } from '../support/engine-fixture.ts';

const thread = startEngineThread();
afterAll(() => thread.close());

describe('engine in a worker thread', () => {
  it('loads, runs, streams frames with transferred buffers and matches the in-process engine', async () => {
    const frames: Frame[] = [];
    const reports: EngineReport[] = [];
    let lastFrame: (f: Frame) => void = () => {};
    const finished = new Promise<Frame>((res) => (lastFrame = res));
    const onFrame = (f: Frame) => {
      frames.push(f);
      if (f.finished) lastFrame(f);
    };
    await thread.api.subscribe(
      Comlink.proxy(onFrame),
      Comlink.proxy((r: EngineReport) => void reports.push(r)),
    );
    const r = await thread.api.load(FIXTURE_TEXT, FIXTURE);
    expect(r.ok).toBe(true);
    await thread.api.start();
    let end = await thread.api.idle();
    expect(end.status).toBe('finished');
    const last = await finished;
    expect(last.finished).toBe(true);
    expect(last.fields.h_anom).toBeInstanceOf(Float32Array);
    expect(frames.flatMap((f) => f.samples).length).toBe(7);

    const local = new Engine({ host: fakeHost(2) });
    await local.load(FIXTURE_TEXT, FIXTURE);
    const localFrames: Frame[] = [];
    local.onFrame((f) => localFrames.push(f));
    local.start();
    await local.idle();
    expect(last.fields.h_anom).toEqual(localFrames.at(-1)!.fields.h_anom);

    const bad = await thread.api.load('{"format": "pycno-scenario/1"', 'x.json');
    expect(bad.ok).toBe(false);
    if (!bad.ok) {
      expect(bad.error.kind).toBe('input');
      expect(bad.error.message).toMatch(/^x\.json: line 1, column \d+: unexpected end of file/);
    }
    end = await thread.api.status();
    expect(end.status).toBe('empty');
    expect(reports.some((x) => x.status === 'running')).toBe(true);
  });
});
