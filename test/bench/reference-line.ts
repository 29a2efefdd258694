// One of Pycno's paths on the shared reference configuration, printing the reference benchmark's
// one-line format:  node --import tsx test/bench/reference-line.ts NX NY STEPS [LABEL]
// Only the step loop is timed; the checksum is the reference's (see model/reference-kernel.ts).
//
// The label names the path:
//   ts-double, wasm-simd            the linear step on one thread, TypeScript or WebAssembly SIMD
//   ts-strips-N, wasm-strips-N      the same in N latitude strips on N threads (model/parallel/)
//   ts-float32, wasm-float32, ts-float32-strips-N, wasm-float32-strips-N   the same in float32
//   nl-ts, nl-wasm, nl-ts-strips-N, nl-wasm-strips-N, nl-wasm-float32, ...   the nonlinear step
// The nonlinear paths run the reference basin and stress with the nonlinear step's own dt (the
// cost of a cell update does not depend on dt); their checksum is only the state's.

import { Grid } from '../../model/grid.ts';
import { Model, type LinearKernelName } from '../../model/model.ts';
import type { Precision } from '../../model/precision.ts';
import { referenceChecksum, referenceConfig, referenceStress } from '../../model/reference-kernel.ts';
import { nodeStripHost } from '../../worker/strips-node.ts';

const [nx, ny, steps] = process.argv.slice(2, 5).map(Number);
const label = process.argv[5] ?? 'ts-double';
const m = /^(nl-)?(ts|wasm)(?:-(?:double|simd))?(-float32)?(?:-strips-(\d+))?$/.exec(label);
if (!m || !(nx >= 8 && ny >= 24 && steps >= 0)) {
  console.error(
    'usage: reference-line NX NY STEPS [LABEL]   (LABEL: [nl-](ts|wasm)[-float32][-strips-N], or ts-double / wasm-simd)',
  );
  process.exit(2);
}
const mode = m[1] ? 'nonlinear' : 'linear';
const kernel = m[2] as LinearKernelName;
const precision: Precision = m[3] ? 'float32' : 'float64';
const strips = m[4] ? Number(m[4]) : 1;

const config = { ...referenceConfig(nx, ny), precision };
if (mode === 'nonlinear') {
  config.physics = { ...config.physics, mode };
  config.time = { dt: null, safety: 0.9 };
}
const wind = referenceStress(new Grid(config.basin, config.physics.earthRadius));
const model = new Model(config, { variant: { ghost: 0, coriolis: 'collocated' }, wind, kernel, threads: strips });
if (strips > 1) {
  const choice = await model.startThreads(nodeStripHost());
  if (choice.threads !== strips) console.error(`(${label}: ${choice.notice})`);
  if (model.stripKernel !== kernel)
    throw new Error(`${label}: the strips ran the ${model.stripKernel ?? 'one-thread'} kernel`);
}
if (model.kernel !== kernel || model.precision !== precision)
  throw new Error(`${label}: the model runs ${model.kernel} in ${model.precision}`);
// Warm the JIT (and each worker's) on the timed model itself, about 4e7 cell updates, then put it
// back to rest like the reference's start (the steady wind stays filled; the new-velocity buffers
// and the history are overwritten or weighted 0 before they are read). A separate warm-up model
// left V8 re-optimising for the new objects in the timed loop, which then read 2-3 times low.
model.advance(Math.max(20, Math.round(4e7 / (nx * ny))));
const s = model.state;
for (const f of [s.u, s.v, s.h, ...s.history.du, ...s.history.dv, ...s.history.dh]) f.fill(0);
s.historyCount = 0;
s.steps = 0;
s.time = 0;
const t0 = process.hrtime.bigint();
model.advance(steps);
const seconds = Number(process.hrtime.bigint() - t0) / 1e9;
const { sumEta, energy } = referenceChecksum(model);
console.log(
  `impl=${label} nx=${nx} ny=${ny} steps=${steps} seconds=${seconds.toFixed(4)} cups=${((nx * ny * steps) / seconds).toExponential(4)} sum_eta=${sumEta.toExponential(15)} energy=${energy.toExponential(15)}`,
);
await model.close();
