// Pycno's linear kernel on the shared reference configuration, printing the reference
// benchmark's one-line format:  node --import tsx test/bench/reference-line.ts NX NY STEPS [LABEL]
// Only the step loop is timed; the checksum is the reference's (see model/reference-kernel.ts).

import type { LinearKernelName } from '../../model/model.ts';
import { referenceChecksum, referenceModel } from '../../model/reference-kernel.ts';

const [nx, ny, steps] = process.argv.slice(2, 5).map(Number);
const label = process.argv[5] ?? 'ts-double';
// The label names the path: ts-double (plain TypeScript), wasm-simd (WebAssembly SIMD).
const kernel: LinearKernelName = label.startsWith('wasm') ? 'wasm' : 'ts';
if (!(nx >= 8 && ny >= 24 && steps >= 0)) {
  console.error('usage: reference-line NX NY STEPS [LABEL]');
  process.exit(2);
}
// Warm the JIT on a separate model, so the timed loop measures compiled code, as the C
// reference's does; the timed model starts from rest like the reference.
referenceModel(nx, ny, kernel).advance(Math.min(50, Math.max(5, Math.round(2e6 / (nx * ny)))));
const model = referenceModel(nx, ny, kernel);
const t0 = process.hrtime.bigint();
model.advance(steps);
const seconds = Number(process.hrtime.bigint() - t0) / 1e9;
const { sumEta, energy } = referenceChecksum(model);
console.log(
  `impl=${label} nx=${nx} ny=${ny} steps=${steps} seconds=${seconds.toFixed(4)} cups=${((nx * ny * steps) / seconds).toExponential(4)} sum_eta=${sumEta.toExponential(15)} energy=${energy.toExponential(15)}`,
);
