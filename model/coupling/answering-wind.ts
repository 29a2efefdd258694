// The answering wind: the wind part whose stress comes from the run's own state. Every N ocean
// steps the SST anomaly is advanced from the thermocline (sst.ts), Gill's atmosphere answers the
// heating eps T' (gill-atmosphere.ts), and the surface wind mu * (u, v) of that answer becomes
// stress on the ocean faces by the part's drag law. The stress joins the designed parts in the one
// stress field the solver reads (model/forcing/wind.ts), so every kernel sees it.
//
// Normalisation: the heating is Q = eps T' / (1 K) in the atmosphere's own units, so that a
// zonally long anomaly of 1 K that projects fully onto phi_0 drives u = -1/2 (east end, Kelvin part)
// and u = +1/2 (west end, Rossby part) on the equator whatever eps is: mu (m s-1 K-1) is then
// twice the equatorial wind at the ends of such an anomaly, per kelvin.

import type { Grid } from '../grid.ts';
import type { AnsweringPart } from '../forcing/spec.ts';
import type { BulkFormula } from '../forcing/bulk.ts';
import type { CoupledIndices, OceanCoupling } from '../forcing/stress.ts';
import { ForcingError } from '../forcing/errors.ts';
import { GillAtmosphere } from './gill-atmosphere.ts';
import { coupledIndices, type IndexLayout } from './indices.ts';
import { SstAnomaly, type SstContext } from './sst.ts';

const DAY = 86400;

/** Ocean faces of one kind as model/forcing/wind.ts lists them: logical i and j of each. */
export interface FaceList {
  n: number;
  i: Int32Array;
  j: Int32Array;
}

export interface AnsweringOptions {
  /** u faces and v faces carrying stress. */
  u: FaceList;
  v: FaceList;
  /** The run's bulk formula (the drag coefficient of both drag laws). */
  bulk: BulkFormula;
  /** beta of the atmosphere's beta plane, m-1 s-1. */
  beta: number;
}

function finite(name: string, v: unknown): number {
  if (!(typeof v === 'number' && Number.isFinite(v)))
    throw new ForcingError(`${name} must be a finite number (got ${String(v)})`);
  return v;
}

export class AnsweringWind {
  readonly part: AnsweringPart;
  readonly sst: SstAnomaly;
  readonly atmosphere: GillAtmosphere;
  readonly strength: number;
  readonly everySteps: number;
  /** The answer's stress on the listed u faces (x) and v faces (y), N m-2. */
  readonly stressU: Float64Array;
  readonly stressV: Float64Array;
  /** The answering wind at cell centres, m s-1 (padded): filled when asked for (output), from the last answer. */
  private readonly windU: Float64Array;
  private readonly windV: Float64Array;
  private centresFresh = false;
  private readonly heating: Float64Array;
  /** The answer's u and v on the listed u faces and v faces (scratch). */
  private readonly scratch: { uOnU: Float64Array; vOnU: Float64Array; uOnV: Float64Array; vOnV: Float64Array };
  private readonly bulk: BulkFormula;
  private readonly faces: { u: FaceList; v: FaceList };
  private readonly layout: IndexLayout;
  private run: (SstContext & { dt: number }) | null = null;
  /** Called after every new answer, so that the wind's next fill() sums it in. */
  private changed: () => void = () => {};

  constructor(
    readonly grid: Grid,
    part: AnsweringPart,
    options: AnsweringOptions,
  ) {
    this.part = part;
    this.strength = finite('strength', part.strength);
    if (this.strength < 0) throw new ForcingError(`strength must be >= 0 (got ${this.strength})`);
    if (!(Number.isInteger(part.everySteps) && part.everySteps >= 1))
      throw new ForcingError(`everySteps must be a whole number >= 1 (got ${String(part.everySteps)})`);
    this.everySteps = part.everySteps;
    if (part.drag !== 'linear' && part.drag !== 'bulk')
      throw new ForcingError(`drag must be 'linear' or 'bulk' (got ${String(part.drag)})`);
    finite('background.x', part.background?.x);
    finite('background.y', part.background?.y);
    const a = part.atmosphere;
    this.sst = new SstAnomaly(grid, part.sst);
    this.atmosphere = new GillAtmosphere(grid, {
      speed: finite('atmosphere.speed', a?.speed),
      damping: 1 / (finite('atmosphere.dampingDays', a?.dampingDays) * DAY),
      heatingModes: a?.heatingModes,
      beta: options.beta,
    });
    this.bulk = options.bulk;
    this.faces = { u: options.u, v: options.v };
    this.stressU = new Float64Array(options.u.n);
    this.stressV = new Float64Array(options.v.n);
    this.windU = grid.field();
    this.windV = grid.field();
    this.heating = grid.field();
    this.scratch = {
      uOnU: new Float64Array(options.u.n),
      vOnU: new Float64Array(options.u.n),
      uOnV: new Float64Array(options.v.n),
      vOnV: new Float64Array(options.v.n),
    };
    const W = grid.W;
    this.layout = {
      nx: grid.nx,
      ny: grid.ny,
      lat: grid.latCentre,
      index: (i, j) => (j + 1) * W + i + 1,
      ocean: grid.ocean,
    };
  }

  /** Add the answer's stress (a zero strength adds nothing, as an envelope at zero does). */
  addStress(sx: Float64Array, sy: Float64Array): void {
    if (this.strength === 0) return;
    const { stressU, stressV } = this;
    for (let k = 0; k < stressU.length; k++) sx[k] += stressU[k];
    for (let k = 0; k < stressV.length; k++) sy[k] += stressV[k];
  }

  /** The atmosphere's answer to an SST field (padded, K): the stress on the ocean faces. */
  answer(sst: Float64Array): void {
    const { heating, atmosphere: atm, grid } = this;
    const eps = atm.eps;
    const ocean = grid.ocean;
    for (let k = 0; k < heating.length; k++) heating[k] = ocean[k] ? eps * sst[k] : 0;
    atm.solve(heating);
    this.centresFresh = false;
    const mu = this.strength;
    const { u, v } = this.faces;
    const { uOnU, vOnU, uOnV, vOnV } = this.scratch;
    const bx = this.part.background.x;
    const by = this.part.background.y;
    const bulk = this.bulk;
    if (this.part.drag === 'linear') {
      // tau = rho_air C_D(|U_b|) |U_b| u: the bulk formula linearised about a background of fixed speed.
      const c = bulk.factor(bx, by) * mu;
      atm.sampleFaces('u', u.i, u.j, u.n, uOnU, null);
      atm.sampleFaces('v', v.i, v.j, v.n, null, vOnV);
      for (let n = 0; n < u.n; n++) this.stressU[n] = c * uOnU[n];
      for (let n = 0; n < v.n; n++) this.stressV[n] = c * vOnV[n];
    } else {
      // The stress anomaly B(U_b + u) - B(U_b) of the bulk formula itself, with both components at each face.
      const fb = bulk.factor(bx, by);
      atm.sampleFaces('u', u.i, u.j, u.n, uOnU, vOnU);
      atm.sampleFaces('v', v.i, v.j, v.n, uOnV, vOnV);
      for (let n = 0; n < u.n; n++) {
        const wx = bx + mu * uOnU[n];
        const wy = by + mu * vOnU[n];
        this.stressU[n] = bulk.factor(wx, wy) * wx - fb * bx;
      }
      for (let n = 0; n < v.n; n++) {
        const wx = bx + mu * uOnV[n];
        const wy = by + mu * vOnV[n];
        this.stressV[n] = bulk.factor(wx, wy) * wy - fb * by;
      }
    }
    this.changed();
  }

  /** The answering surface wind at the ocean's cell centres (padded, m s-1; land 0), from the last answer. */
  centredWind(): { u: Float64Array; v: Float64Array } {
    if (!this.centresFresh) {
      const { grid, atmosphere: atm } = this;
      const mu = this.strength;
      for (let j = 0; j < grid.ny; j++) {
        for (let i = 0; i < grid.nx; i++) {
          const k = grid.idx(i, j);
          if (!grid.ocean[k]) continue;
          atm.atCentre(i, j);
          this.windU[k] = mu * atm.point.u;
          this.windV[k] = mu * atm.point.v;
        }
      }
      this.centresFresh = true;
    }
    return { u: this.windU, v: this.windV };
  }

  /** The answer to a test anomaly of `kelvin` K times the region S (the wind preview shows it). */
  answerTestAnomaly(kelvin: number): void {
    const t = this.grid.field();
    for (let k = 0; k < t.length; k++) t[k] = kelvin * this.sst.region[k];
    this.answer(t);
  }

  /** The OceanCoupling the model drives; `changed` makes the wind's next fill() re-evaluate. */
  coupling(changed: () => void): OceanCoupling {
    this.changed = changed;
    const self = this;
    return {
      everySteps: this.everySteps,
      centredWind: () => self.centredWind(),
      start(state, run) {
        self.run = { physics: run.physics, fCentre: run.fCentre, dt: run.dt };
        if (!state.sst) {
          state.sst = self.grid.field();
          self.sst.fillInitial(state.sst);
        }
        self.answer(state.sst);
      },
      couple(state, taux, tauy) {
        const run = self.run;
        if (!run) throw new Error('the answering wind was not started');
        if (!state.sst) throw new Error('the state carries no SST anomaly');
        self.sst.step(state.sst, state.h, state.u, taux, tauy, self.everySteps * run.dt, run);
        self.answer(state.sst);
      },
      indices(state): CoupledIndices {
        return coupledIndices(self.layout, self.sst.region, state.sst ?? self.grid.field(), state.h);
      },
    };
  }
}
