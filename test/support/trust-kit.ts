// Shared by the trust tests: the tiny fixture with random bursts added, an in-process command
// line, and a bit-for-bit comparison of NetCDF files that does not use the code under test.

import { readFileSync } from 'node:fs';
import { readNetcdf, type NcFile } from '../../model/io/netcdf-read.ts';
import { main } from '../../worker/cli/main.ts';
import { FIXTURE_TEXT } from './engine-fixture.ts';

export { FIXTURE, FIXTURE_TEXT } from './engine-fixture.ts';

/** A bursts part drawn from the scenario's seed; a few bursts fall inside the first days. */
export const BURSTS_PART = {
  kind: 'bursts',
  name: 'test bursts',
  quantity: 'stress',
  ratePerYear: 200,
  window: [0, 8],
  amplitude: [0.05, 0.12],
  lon: [158, 175],
  lat: [-2, 2],
  lonWidth: [3, 6],
  latWidth: [2, 4],
  duration: [1, 3],
  ramp: 0.5,
};

/** The fixture with the bursts part added to its wind. */
export function withBursts(text = FIXTURE_TEXT): string {
  const sc = JSON.parse(text);
  sc.wind.parts.push(BURSTS_PART);
  return JSON.stringify(sc, null, 2);
}

export interface CliResult {
  code: number;
  stdout: string;
  stderr: string;
}

/** The command line in this process (the same main() that bin/pycno.js calls). */
export async function cli(args: string[], cwd: string): Promise<CliResult> {
  let stdout = '';
  let stderr = '';
  const code = await main(args, {
    stdout: { write: (s: string) => (stdout += s) },
    stderr: { write: (s: string) => (stderr += s), isTTY: false } as never,
    cwd,
  });
  return { code, stdout, stderr };
}

export function readNc(path: string): NcFile {
  return readNetcdf(new Uint8Array(readFileSync(path)));
}

/** Bytes of a number array as float64, so NaN payloads and -0 count. */
function bits(values: Float64Array): Buffer {
  return Buffer.from(values.buffer, values.byteOffset, values.byteLength);
}

/** Names of the variables whose values differ in any bit (or that only one file has). */
export function differingVariables(a: NcFile, b: NcFile): string[] {
  const out: string[] = [];
  const names = new Set([...a.variables, ...b.variables].map((v) => v.name));
  for (const n of names) {
    const va = a.variables.find((v) => v.name === n);
    const vb = b.variables.find((v) => v.name === n);
    if (!va || !vb) out.push(n);
    else if (typeof va.values === 'string' || typeof vb.values === 'string') {
      if (va.values !== vb.values) out.push(n);
    } else if (!bits(va.values).equals(bits(vb.values))) out.push(n);
  }
  return out;
}
