// Pycno's linear kernel on the shared reference configuration, printing the reference
// benchmark's one-line format:  node --import tsx test/bench/reference-line.ts NX NY STEPS [LABEL]
// Only the step loop is timed; the checksum is the reference's (see model/reference-kernel.ts).

import { Grid } from '../../model/grid.ts';
import { Model, type LinearKernelName } from '../../model/model.ts';
import { referenceChecksum, referenceConfig, referenceModel, referenceStress } from '../../model/reference-kernel.ts';
import { nodeStripHost } from '../../worker/strips-node.ts';

const [nx, ny, steps] = process.argv.slice(2, 5).map(Number);
const label = process.argv[5] ?? 'ts-double';
// The label names the path: ts-double (plain TypeScript), wasm-simd (WebAssembly SIMD),
// ts-strips-N (the TypeScript rows in N latitude strips on N threads, model/parallel/),
// wasm-strips-N (the WebAssembly kernel in N strips over one shared memory).
const kernel: LinearKernelName = label.startsWith('wasm') ? 'wasm' : 'ts';
const strips = /^(?:ts|wasm)-strips-(\d+)$/.exec(label);
if (!(nx >= 8 && ny >= 24 && steps >= 0)) {
  console.error('usage: reference-line NX NY STEPS [LABEL]');
  process.exit(2);
}
// Enough steps for V8 to finish optimising the row functions (about 4e7 cell updates).
const warmSteps = Math.max(20, Math.round(4e7 / (nx * ny)));
let model: Model;
if (strips) {
  // Each worker is a fresh JIT: warm the team itself, then put its state back to rest (the
  // steady wind stays filled; the new-velocity buffers are overwritten before they are read).
  const config = referenceConfig(nx, ny);
  const wind = referenceStress(new Grid(config.basin, config.physics.earthRadius));
  model = new Model(config, { variant: { ghost: 0, coriolis: 'collocated' }, wind, kernel, threads: Number(strips[1]) });
  const choice = await model.startThreads(nodeStripHost());
  if (choice.threads !== Number(strips[1])) console.error(`(${label}: ${choice.notice})`);
  const ran = model.stripKernel;
  if (ran !== kernel) throw new Error(`${label}: the strips ran the ${ran ?? 'one-thread'} kernel`);
  model.advance(warmSteps);
  for (const f of [model.state.u, model.state.v, model.state.h]) f.fill(0);
  model.state.steps = 0;
  model.state.time = 0;
} else {
  // Warm the JIT on the timed model itself, then put it back to rest like the reference's start
  // (a separate warm-up model left V8 re-optimising for the new objects in the timed loop, which
  // then read 2-3 times low on short runs).
  model = referenceModel(nx, ny, kernel);
  model.advance(warmSteps);
  for (const f of [model.state.u, model.state.v, model.state.h]) f.fill(0);
  model.state.steps = 0;
  model.state.time = 0;
}
const t0 = process.hrtime.bigint();
model.advance(steps);
const seconds = Number(process.hrtime.bigint() - t0) / 1e9;
const { sumEta, energy } = referenceChecksum(model);
console.log(
  `impl=${label} nx=${nx} ny=${ny} steps=${steps} seconds=${seconds.toFixed(4)} cups=${((nx * ny * steps) / seconds).toExponential(4)} sum_eta=${sumEta.toExponential(15)} energy=${energy.toExponential(15)}`,
);
await model.close();
