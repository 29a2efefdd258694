// Cost per cell update of the nonlinear step (AB3, vector-invariant) against the linear step, on
// the reference basin at one size, interleaved repetitions, medians of CPU time per step.
//   node --import tsx test/bench/nonlinear-cost.ts NX NY REPEATS

import { Grid } from '../../model/grid.ts';
import { Model, type ModelOptions } from '../../model/model.ts';
import { referenceConfig, referenceStress } from '../../model/reference-kernel.ts';

const [nx, ny, repeats] = [
  Number(process.argv[2] ?? 640),
  Number(process.argv[3] ?? 240),
  Number(process.argv[4] ?? 5),
];

function make(mode: 'linear' | 'nonlinear', kernel: ModelOptions['kernel']): Model {
  const cfg = referenceConfig(nx, ny);
  cfg.physics = { ...cfg.physics, mode };
  cfg.time = { dt: null, safety: 0.9 };
  return new Model(cfg, { wind: referenceStress(new Grid(cfg.basin, cfg.physics.earthRadius)), kernel });
}

const cases = {
  'linear-ts': () => make('linear', 'ts'),
  'linear-wasm': () => make('linear', 'wasm'),
  'nonlinear-ts': () => make('nonlinear', 'ts'),
  'nonlinear-wasm': () => make('nonlinear', 'wasm'),
};
const steps = Math.max(20, Math.round(3e7 / (nx * ny)));
const ns: Record<string, number[]> = {};
for (const [name, f] of Object.entries(cases)) {
  f().advance(20); // warm the JIT
  ns[name] = [];
}
for (let r = 0; r < repeats; r++) {
  for (const [name, f] of Object.entries(cases)) {
    const m = f();
    const c0 = process.cpuUsage();
    m.advance(steps);
    const c = process.cpuUsage(c0);
    ns[name].push(((c.user + c.system) * 1e3) / (nx * ny * steps));
  }
}
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const lin = median(ns['linear-ts']);
for (const name of Object.keys(cases)) {
  const m = median(ns[name]);
  console.log(`cost ${name.padEnd(14)} ${m.toFixed(2)} ns/cell  (${(m / lin).toFixed(2)} x linear-ts)`);
}
