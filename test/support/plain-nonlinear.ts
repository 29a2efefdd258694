// The nonlinear step as the plain statement steps it (nonlinearStep in model/dynamics/nonlinear.ts,
// whole-grid loops, a scratch set of tendencies), driven as Model.advance drives its step: the same
// wind refills (steady once, else once per update interval), the volume-keeping sponge after each
// step, the sponge volume into the budget, the time read from the clock. Every fast path of the
// nonlinear step (TypeScript rows, WebAssembly rows, strips) must give these bits.

import type { ModelConfig } from '../../model/config.ts';
import { nonlinearStep, nonlinearWork } from '../../model/dynamics/nonlinear.ts';
import { VolumeKeepingSponge } from '../../model/dynamics/sponge.ts';
import type { WindStress } from '../../model/forcing/stress.ts';
import { Model, type ModelOptions } from '../../model/model.ts';
import type { State } from '../../model/state.ts';
import { sameBits } from './bits.ts';

export class PlainNonlinear {
  readonly state: State;
  /** A model never advanced: its grid, coefficients and clock. */
  readonly base: Model;
  private readonly work;
  private readonly taux;
  private readonly tauy;
  private filledFor = NaN;
  private readonly keeper: VolumeKeepingSponge | null;

  constructor(
    cfg: ModelConfig,
    private readonly wind: WindStress,
    initial?: ModelOptions['initial'],
  ) {
    this.base = new Model(cfg, { wind, kernel: 'ts', ...(initial ? { initial } : {}) });
    if (this.base.physics.mode !== 'nonlinear') throw new Error('PlainNonlinear needs the nonlinear mode');
    this.state = this.base.state.clone();
    this.work = nonlinearWork(this.base.grid);
    this.taux = this.base.grid.field();
    this.tauy = this.base.grid.field();
    const c = this.base.coefficients;
    this.keeper =
      cfg.physics.sponge.conserveVolume && c.spongeRowsH.length > 0 ? new VolumeKeepingSponge(this.base.grid, c) : null;
  }

  advance(n: number): void {
    const { grid, coefficients: c, physics, clock } = this.base;
    const s = this.state;
    for (let i = 0; i < n; i++) {
      this.fillWind(s.time);
      s.volumeBudget!.spongeMeasured -= nonlinearStep(grid, c, physics, this.taux, this.tauy, s, this.work);
      if (this.keeper) s.volumeBudget!.spongeMeasured += this.keeper.restore(s.h);
      s.steps++;
      s.time = clock.timeAt(s.steps);
    }
  }

  private fillWind(t: number): void {
    const w = this.wind;
    if (w.steady) {
      if (!Number.isNaN(this.filledFor)) return;
      this.filledFor = 0;
    } else if (w.updateSeconds && w.updateSeconds > 0) {
      const slot = Math.floor(t / w.updateSeconds);
      if (slot === this.filledFor) return;
      this.filledFor = slot;
    }
    w.fill(t, this.taux, this.tauy);
  }
}

/** Which of a state's arrays differ in any bit from another's (empty when none). */
export function differences(a: State, b: State): string[] {
  const out: string[] = [];
  const pairs: Array<[string, Float64Array | Float32Array, Float64Array | Float32Array]> = [
    ['u', a.u, b.u],
    ['v', a.v, b.v],
    ['h', a.h, b.h],
  ];
  for (const key of ['du', 'dv', 'dh'] as const) {
    for (const n of [0, 1]) pairs.push([`history.${key}[${n}]`, a.history[key][n], b.history[key][n]]);
  }
  for (const [name, x, y] of pairs) if (!sameBits(x, y)) out.push(name);
  if (a.historyCount !== b.historyCount) out.push('historyCount');
  if (a.steps !== b.steps || a.time !== b.time) out.push('clock');
  if (!Object.is(a.volumeBudget?.spongeMeasured, b.volumeBudget?.spongeMeasured))
    out.push('volumeBudget.spongeMeasured');
  return out;
}
