// The coupled indices of a saved run (a run file read back): the eastern SST index and the
// warm-water volume at every record that kept its fields, from sst_anom and h_anom and the region
// of the run's own answering part (its scenario JSON is in the file). The same numbers the running
// model gives (model/coupling/indices.ts), up to the single precision of the file.

import type { RunData } from '../io/run-data.ts';
import type { AnsweringPart } from '../forcing/spec.ts';
import { compileShape } from '../forcing/shapes.ts';
import { answeringPartOf } from './derived.ts';
import { coupledIndices } from './indices.ts';
import { REGION_FLOOR } from './sst.ts';

export interface CoupledSeries {
  days: number[];
  eastSst: number[];
  warmWater: number[];
  /** The answering part of the run. */
  part: AnsweringPart;
}

/** Null when the run has no answering part on, or lacks sst_anom or h_anom. */
export function coupledSeries(run: RunData): CoupledSeries | null {
  if (!run.fields.includes('sst_anom') || !run.fields.includes('h_anom')) return null;
  let parts: unknown;
  try {
    parts = (JSON.parse(run.scenarioJson) as { wind?: { parts?: unknown } }).wind?.parts;
  } catch {
    return null;
  }
  if (!Array.isArray(parts)) return null;
  const found = answeringPartOf(parts);
  if (!found) return null;
  const { nx, ny, lon, lat, ocean } = run.grid;
  const shape = compileShape(found.part.sst.region);
  const region = new Float64Array(nx * ny);
  for (let j = 0; j < ny; j++) {
    for (let i = 0; i < nx; i++) {
      const s = shape.at(lon[i], lat[j], 0);
      region[j * nx + i] = Math.abs(s) < REGION_FLOOR ? 0 : s;
    }
  }
  const layout = { nx, ny, lat, ocean, index: (i: number, j: number) => j * nx + i };
  const out: CoupledSeries = { days: [], eastSst: [], warmWater: [], part: found.part };
  for (const s of run.snapshots) {
    const sst = s.fields.sst_anom;
    const h = s.fields.h_anom;
    if (!sst || !h) continue;
    const c = coupledIndices(layout, region, sst, h);
    out.days.push(s.day);
    out.eastSst.push(c.eastSst);
    out.warmWater.push(c.warmWater);
  }
  return out;
}
