// Engine.setSampleFields: every k-th output sample carries the full fields, the same values the
// recorder (the command line's NetCDF path) gets for that record, and their buffers go out for
// transfer with the frame.

import { describe, expect, it } from 'vitest';
import type { OutputRecord } from '../../model/io/run-output.ts';
import { Engine } from '../../worker/engine.ts';
import { transferList } from '../../worker/frames.ts';
import type { Frame } from '../../worker/protocol.ts';
import { FIXTURE, FIXTURE_TEXT, fakeHost } from '../support/engine-fixture.ts';

async function run(
  every: number | null,
): Promise<{ frames: Array<{ frame: Frame; transfer: ArrayBuffer[] }>; records: OutputRecord[]; fields: string[] }> {
  const engine = new Engine({ host: fakeHost(5) });
  if (every !== null) engine.setSampleFields(every);
  const r = await engine.load(FIXTURE_TEXT, FIXTURE, { sets: ['time.days=6', 'time.outputEveryDays=0.5'] });
  if (!r.ok) throw new Error(r.error.message);
  const records: OutputRecord[] = [];
  engine.setRecorder((rec) => void records.push(rec));
  const frames: Array<{ frame: Frame; transfer: ArrayBuffer[] }> = [];
  engine.onFrame((frame, transfer) => frames.push({ frame, transfer }));
  engine.start();
  expect((await engine.idle()).status).toBe('finished');
  return { frames, records, fields: r.scenario.fields };
}

describe('output samples with full fields', () => {
  it('carries the fields of every k-th sample, equal to the recorded record, with the step', async () => {
    const { frames, records, fields } = await run(3);
    const samples = frames.flatMap((f) => f.frame.samples);
    expect(samples.length).toBe(records.length);
    expect(samples.length).toBe(13);
    samples.forEach((s, k) => {
      expect(s.day).toBe(records[k].day);
      expect(s.step).toBe(records[k].step);
      if (k % 3 === 0) {
        expect(Object.keys(s.fields!).sort()).toEqual([...fields].sort());
        for (const f of fields)
          expect(Array.from(s.fields![f as keyof typeof s.fields]!)).toEqual(
            Array.from(records[k].fields[f as keyof OutputRecord['fields']]!),
          );
      } else expect(s.fields).toBeUndefined();
    });
    // Later samples differ from the first (the wind acts): the fields are the record's own.
    const h0 = samples[0].fields!.h_anom!;
    const h12 = samples[12].fields!.h_anom!;
    expect(h12.some((x, c) => x !== h0[c])).toBe(true);
  });

  it('lists the sample fields for transfer with the frame', async () => {
    const { frames } = await run(1);
    for (const { frame, transfer } of frames) {
      const listed = new Set(transferList(frame));
      expect(transfer.length).toBe(listed.size);
      for (const s of frame.samples)
        for (const a of Object.values(s.fields ?? {})) expect(listed.has(a!.buffer as ArrayBuffer)).toBe(true);
    }
    expect(frames.flatMap((f) => f.frame.samples).every((s) => s.fields !== undefined)).toBe(true);
  });

  it('sends no fields in samples by default or after 0, and refuses a bad interval', async () => {
    const { frames } = await run(null);
    expect(frames.flatMap((f) => f.frame.samples).some((s) => s.fields !== undefined)).toBe(false);
    const { frames: off } = await run(0);
    expect(off.flatMap((f) => f.frame.samples).some((s) => s.fields !== undefined)).toBe(false);
    const engine = new Engine({ host: fakeHost(5) });
    expect(() => engine.setSampleFields(1.5)).toThrow(
      /setSampleFields: 'every' must be a whole number >= 0 \(got 1.5\)/,
    );
    expect(() => engine.setSampleFields(-1)).toThrow(/whole number/);
  });
});
