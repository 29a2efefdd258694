// Output samples and records: what the run gives at every output interval. A sample (integrals,
// h' along the Hovmoller rows, every field at the probes) goes to the frames' listeners; the
// record adds the full fields and goes to the recorder (the command line's NetCDF file).

import { centredField, type FieldName } from '../model/diagnostics/fields.ts';
import type { OutputRecord } from '../model/io/run-output.ts';
import type { OutputSample } from './protocol.ts';
import type { RunPlan } from './run-plan.ts';

/**
 * The sample of the run's model now. The model checks itself every few steps; a record (the last
 * one included) is never made from a state that has gone bad in between: the run fails here with
 * the blow-up instead.
 */
export function takeSample(run: RunPlan): OutputSample {
  const { model, fields } = run;
  model.checkHealth();
  const ctx = model.fieldContext();
  const nx = model.grid.nx;
  const rowCache = new Map<string, Float64Array>();
  const row = (f: FieldName, j: number) => {
    const key = `${f}:${j}`;
    let r = rowCache.get(key);
    if (!r) {
      r = new Float64Array(nx);
      centredField(f, ctx, r, { from: j, to: j + 1 });
      rowCache.set(key, r);
    }
    return r;
  };
  const hovmoller = run.hovRows.map((j) => Float32Array.from(row('h_anom', j)));
  const probeValues = run.probeCells.map(({ i, j }) => Float32Array.from(fields, (f) => row(f, j)[i]));
  const integrals = model.integrals();
  const sample: OutputSample = { day: model.day, step: model.state.steps, integrals, hovmoller, probeValues };
  const coupled = model.coupledIndices();
  if (coupled) sample.coupled = coupled;
  return sample;
}

/** Every output field of the run's model now, in fresh arrays. */
export function fullFields(run: RunPlan): Partial<Record<FieldName, Float32Array>> {
  const { model, fields } = run;
  const out: Partial<Record<FieldName, Float32Array>> = {};
  for (const f of fields) out[f] = model.field(f, new Float32Array(model.grid.nx * model.grid.ny)) as Float32Array;
  return out;
}

/** The record of a sample: its series and the full fields. */
export function outputRecord(sample: OutputSample, fields: Partial<Record<FieldName, Float32Array>>): OutputRecord {
  return {
    day: sample.day,
    step: sample.step!,
    fields,
    integrals: sample.integrals,
    hovmoller: sample.hovmoller,
    probeValues: sample.probeValues,
  };
}
