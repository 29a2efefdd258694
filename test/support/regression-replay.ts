// How a kept regression input is fed back, by its file name: scenario-*.json to the scenario
// loader and builder, formula-*.txt to the formula compiler, csv-*.csv to the CSV reader,
// netcdf-*.nc to the NetCDF readers. Returns what was thrown (undefined when accepted).

import { compileFormula } from '../../model/forcing/formula.ts';
import { parseWindCsv } from '../../model/forcing/csv.ts';
import { readNetcdfVectors } from '../../model/forcing/gridded.ts';
import { Grid } from '../../model/grid.ts';
import { readNetcdf } from '../../model/io/netcdf-read.ts';
import { readStartFile } from '../../model/io/restart.ts';
import { readRun } from '../../model/io/run-import.ts';
import { buildPrepared, parseScenario } from '../../model/scenario/load-inputs.ts';
import { EARTH } from '../../model/config.ts';

export function replayRegression(name: string, bytes: Uint8Array): unknown {
  const text = () => new TextDecoder().decode(bytes);
  try {
    if (name.startsWith('scenario-')) {
      const p = parseScenario(text(), name);
      buildPrepared(p, { files: new Map(), notes: [] }).model.advance(3);
    } else if (name.startsWith('formula-')) {
      compileFormula(text().replace(/\n$/, '')).evaluate(160, 0, 1);
    } else if (name.startsWith('csv-')) {
      parseWindCsv(text());
    } else if (name.startsWith('netcdf-wind-')) {
      readNetcdfVectors(bytes);
    } else if (name.startsWith('netcdf-')) {
      readNetcdf(bytes);
      readStartFile(
        bytes,
        new Grid({ lonWest: 150, lonEast: 190, latSouth: -10, latNorth: 10, dLon: 1, dLat: 1, land: [] }, EARTH.radius),
      );
      readRun(bytes);
    } else throw new Error(`unknown regression kind: ${name}`);
  } catch (e) {
    return e;
  }
  return undefined;
}
