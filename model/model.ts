// A model run: grid, coefficients, state, wind and the time loop with blow-up checks. Hosts (the
// engine in a worker, the command line, tests) drive it with advance() and read diagnostics.

import type { ModelConfig, PhysicsConfig } from './config.ts';
import { DAY } from './config.ts';
import {
  buildCoefficients,
  largestCoriolis,
  type KernelVariant,
  type StepCoefficients,
} from './dynamics/coefficients.ts';
import { wasmAvailable } from './dynamics/linear-wasm.ts';
import { createStepper, type KernelName, type Stepper } from './dynamics/stepper.ts';
import { PRECISIONS, type Precision } from './precision.ts';
import { VolumeKeepingSponge } from './dynamics/sponge.ts';
import { chooseTimeStep, stabilityLimit, stepsInInterval, type StabilityLimit } from './dynamics/stability.ts';
import { Clock } from './clock.ts';
import { coriolisParameter, waveSpeed } from './theory.ts';
import { centredField, type FieldContext, type FieldName } from './diagnostics/fields.ts';
import { anomalySum, integrals, type Integrals } from './diagnostics/integrals.ts';
import { BlowUpError, InputError } from './errors.ts';
import { calm, type CoupledIndices, type OceanCoupling, type WindStress } from './forcing/stress.ts';
import { Grid } from './grid.ts';
import { RUNAWAY_SPEED } from './health-limits.ts';
import { checkInitial, initialState, type InitialSpec } from './initial.ts';
import { State, type FieldArray } from './state.ts';
import { StripTeam, type StripHost, type TeamOptions } from './parallel/team.ts';
import { checkThreadsOption, chooseThreads, type ThreadChoice, type ThreadsOption } from './parallel/threads.ts';
import { wasmStripsAvailable } from './parallel/wasm-strips.ts';

/** Flow faster than this is not an ocean any more (a blow-up), m s-1 (health-limits.ts). */
export { RUNAWAY_SPEED } from './health-limits.ts';
/** Steps between health scans; a blow-up grows exponentially, so it is caught within a few. */
const HEALTH_EVERY = 10;

export interface ModelOptions {
  wind?: WindStress;
  /** An initial-state description, or a ready state on the same grid (a restart). */
  initial?: InitialSpec | State;
  /** Discretisation variant; only for reproducing the reference kernel (npm run bench). */
  variant?: KernelVariant;
  /**
   * Which implementation of the step runs, in either mode (same results bit for bit): 'ts'
   * (plain TypeScript), 'wasm' (WebAssembly SIMD), or 'auto' (the default: wasm where it
   * compiles, else ts).
   */
  kernel?: KernelName | 'auto';
  /**
   * Threads for the step, split into latitude strips (model/parallel/): a count, or 'auto'
   * (one per core where each strip keeps at least 40,000 cells, and with the WebAssembly kernel
   * at hand only from 4 cores; see chooseThreads). Default 1. The strips run the WebAssembly kernel
   * over one shared memory when this model steps on WebAssembly, else the TypeScript rows.
   * Takes effect when the host calls startThreads(); the results are the same bits either way.
   */
  threads?: ThreadsOption;
}

/** The kernels of a step (either mode): plain TypeScript or WebAssembly SIMD. */
export type LinearKernelName = KernelName;

export class Model {
  readonly config: ModelConfig;
  readonly physics: PhysicsConfig;
  readonly grid: Grid;
  readonly dt: number;
  /** Reads the time of each step from the step count (model/clock.ts). */
  readonly clock: Clock;
  readonly limit: StabilityLimit;
  readonly coefficients: StepCoefficients;
  readonly state: State;
  /** Current wind stress on u and v faces, N m-2. */
  readonly taux: Float64Array;
  readonly tauy: Float64Array;
  /** f at cell-centre rows, s-1. */
  readonly fCentre: Float64Array;
  private readonly wind: WindStress;
  /** The wind's side that answers the ocean (an answering part), or null. */
  private readonly coupling: OceanCoupling | null;
  /** The one-thread step (a strip team, once started, steps instead). */
  private readonly stepper: Stepper;
  /** What the one-thread step runs on. */
  private readonly stepKernel: KernelName;
  /** The working precision of the state and the step (model/precision.ts). */
  readonly precision: Precision;
  private readonly nonlinear: boolean;
  /** The threads option as given; the strip team once startThreads() has started it. */
  readonly threadsAsked: ThreadsOption;
  private team: StripTeam | null = null;
  /** A startThreads() under way, so that a second call or close() waits for it. */
  private starting: Promise<ThreadChoice> | null = null;
  private windFilledFor = NaN;
  /** The volume-keeping sponge pass (basin.sponge.conserveVolume), or null. */
  private readonly keeper: VolumeKeepingSponge | null;

  constructor(config: ModelConfig, options: ModelOptions = {}) {
    checkPhysics(config.physics);
    if (config.precision !== undefined && !PRECISIONS.includes(config.precision)) {
      throw new InputError(
        `must be one of ${PRECISIONS.join(', ')} (got ${JSON.stringify(config.precision)})`,
        'numerics.precision',
      );
    }
    this.config = config;
    this.physics = config.physics;
    this.grid = new Grid(config.basin, config.physics.earthRadius);
    checkSponge(this.grid, config.physics);

    const p = config.physics;
    this.limit = stabilityLimit({
      c: waveSpeed(p.reducedGravity, p.layerThickness),
      dx: this.grid.dx,
      dy: this.grid.dy,
      fMax: largestCoriolis(this.grid, p),
      viscosity: p.viscosity,
      friction: p.friction,
      spongeRate: p.sponge.widthDeg > 0 ? p.sponge.rateAtWall : 0,
      mode: p.mode,
    });
    this.dt = chooseTimeStep(this.limit, config.time.dt, config.time.safety, config.time.alignTo);
    this.coefficients = buildCoefficients(this.grid, p, this.dt, options.variant);
    this.fCentre = this.coefficients.fU;

    const init = options.initial ?? { kind: 'rest' };
    if (init instanceof State) {
      if (init.grid.nx !== this.grid.nx || init.grid.ny !== this.grid.ny) {
        throw new InputError(
          `the restart state is on a ${init.grid.nx} x ${init.grid.ny} grid, the scenario on ${this.grid.nx} x ${this.grid.ny}`,
          'initial',
        );
      }
      checkInitial(this.grid, p, init, this.dt);
      this.state = new State(this.grid);
      this.state.copyFrom(init);
    } else {
      this.state = initialState(this.grid, p, init);
    }
    // The clock counts in whole steps of the output interval when there is one (the dt was chosen
    // or checked to divide it); a restart's clock goes on when its step is this one's.
    const interval =
      config.time.alignTo && config.time.alignTo > 0 && Number.isFinite(config.time.alignTo) ? config.time.alignTo : 0;
    const perInterval = interval > 0 ? stepsInInterval(this.dt, interval) : 0;
    const given = this.state.clock;
    this.clock = Clock.continuing(
      this.dt,
      perInterval > 0 ? interval : 0,
      perInterval,
      this.state.steps,
      this.state.time,
      given,
    );
    // The stress a state shows is the one in force over the step that ended at it: for a state
    // some run has stepped, read on that run's clock; for a fresh start, the first step's.
    const previous =
      this.state.steps > 0 ? (given ? new Clock(given) : this.clock).timeAt(this.state.steps - 1) : this.state.time;
    this.state.clock = { ...this.clock.spec };

    this.wind = options.wind ?? calm;
    this.taux = this.grid.field();
    this.tauy = this.grid.field();
    const kernel = options.kernel ?? 'auto';
    this.threadsAsked = checkThreadsOption(options.threads ?? 1);
    this.stepKernel = kernel === 'wasm' || (kernel === 'auto' && wasmAvailable()) ? 'wasm' : 'ts';
    this.precision = config.precision ?? 'float64';
    this.stepper = createStepper(this.grid, this.coefficients, p, this.stepKernel, this.precision);
    this.stepper.adopt(this.state);
    this.nonlinear = p.mode === 'nonlinear';
    this.keeper =
      p.sponge.conserveVolume && this.coefficients.spongeRowsH.length > 0
        ? new VolumeKeepingSponge(this.grid, this.coefficients)
        : null;
    // A state some model has run carries its experiment's budget; a fresh one starts it here.
    this.state.volumeBudget ??= { anomalyAtStart: anomalySum(this.grid, this.state.h), spongeMeasured: 0 };
    // A coupled wind answers the state's SST before the first fill: a restart recomputes the very
    // wind the run that wrote it had in force.
    this.coupling = this.wind.coupling ?? null;
    this.coupling?.start(this.state, { physics: p, dt: this.dt, fCentre: this.fCentre });
    this.updateWind(previous);
  }

  get day(): number {
    return this.state.time / DAY;
  }

  /** Take n steps; throws BlowUpError (with day, place and hint) if the solution goes bad. */
  advance(n: number): void {
    if (this.team) {
      this.advanceStrips(n, this.team);
      return;
    }
    const stepper = this.stepper;
    for (let s = 0; s < n; s++) {
      this.coupleIfDue();
      this.updateWind(this.state.time);
      const taken = stepper.step(this.state, this.physics.friction, this.physics.viscosity);
      if (this.nonlinear) this.state.volumeBudget!.spongeMeasured -= taken;
      if (this.keeper) {
        const added = this.keeper.restore(this.state.h);
        if (this.nonlinear) this.state.volumeBudget!.spongeMeasured += added;
      }
      this.tick();
      if (this.state.steps % HEALTH_EVERY === 0) this.checkHealth();
    }
  }

  private advanceStrips(n: number, team: StripTeam): void {
    try {
      for (let s = 0; s < n; s++) {
        // The coupling reads h' and u: the workers must have finished the step before.
        if (this.couplingDue()) team.sync();
        this.coupleIfDue();
        this.updateWind(this.state.time);
        team.step(this.state, this.physics.friction, this.physics.viscosity);
        this.takeSponge(team);
        if (this.keeper) {
          // The band means need every strip's h rows of this step: wait for the workers.
          team.sync();
          this.takeSponge(team);
          const added = this.keeper.restore(this.state.h);
          if (this.nonlinear) this.state.volumeBudget!.spongeMeasured += added;
        }
        this.tick();
        if (this.state.steps % HEALTH_EVERY === 0) {
          team.sync();
          this.checkHealth();
        }
      }
    } finally {
      team.sync();
      this.takeSponge(team);
    }
  }

  /** The nonlinear step's sponge volumes of the team's finished steps, into the budget in step order. */
  private takeSponge(team: StripTeam): void {
    for (const taken of team.takeSpongeTaken()) if (this.nonlinear) this.state.volumeBudget!.spongeMeasured -= taken;
  }

  /**
   * Start the strip workers the threads option asks for (none for 1). Asynchronous: spawning must not block the thread. Until it resolves, advance() runs
   * on this thread, with the same results. The choice says how many threads run and why.
   * options.threads, when given, replaces the threads option of the constructor.
   */
  startThreads(host: StripHost, options: TeamOptions & { threads?: ThreadsOption } = {}): Promise<ThreadChoice> {
    this.starting ??= this.startTeam(host, options).finally(() => (this.starting = null));
    return this.starting;
  }

  private async startTeam(host: StripHost, options: TeamOptions & { threads?: ThreadsOption }): Promise<ThreadChoice> {
    if (this.team) return { threads: this.team.size, notice: null };
    const asked = options.threads === undefined ? this.threadsAsked : checkThreadsOption(options.threads);
    // The strips run the kernel the model runs: WebAssembly strips where the model steps on
    // WebAssembly and the shared-memory module works here, else the TypeScript rows.
    const wasm = this.stepKernel === 'wasm';
    const stripKernel = options.kernel ?? (wasm && wasmStripsAvailable() ? 'wasm' : 'ts');
    const choice = chooseThreads(asked, this.grid, host.cores, this.stepKernel, stripKernel);
    if (choice.threads < 2) return choice;
    const team = await StripTeam.start(this.grid, this.coefficients, this.physics, choice.threads, host.spawn, {
      ...options,
      kernel: stripKernel,
      precision: this.precision,
    });
    // The state moves into the team's shared buffers (the one-thread step takes it back on close).
    team.adopt(this.state);
    team.setStress(this.taux, this.tauy);
    this.team = team;
    return choice;
  }

  /** What computes the strips' rows ('ts' or 'wasm'); null without a strip team. */
  get stripKernel(): 'ts' | 'wasm' | null {
    return this.team?.kernelName ?? null;
  }

  /** Threads stepping this run (1 without a strip team). */
  get threads(): number {
    return this.team?.size ?? 1;
  }

  /** Stop the strip workers, if any; the model goes on (on one thread) with the same state. */
  async close(): Promise<void> {
    await this.starting?.catch(() => undefined);
    const team = this.team;
    this.team = null;
    if (team) {
      await team.close();
      this.stepper.adopt(this.state);
      this.stepper.setStress(this.taux, this.tauy);
    }
  }

  /** The linear step's stress accelerations (tests step the plain loops beside the model with them). */
  get accelX(): FieldArray | undefined {
    return this.stepper.accelerations?.accelX;
  }

  get accelY(): FieldArray | undefined {
    return this.stepper.accelerations?.accelY;
  }

  /** True when the step about to start is a coupling step: n > 0 and n a multiple of everySteps. */
  private couplingDue(): boolean {
    const c = this.coupling;
    return c !== null && this.state.steps > 0 && this.state.steps % c.everySteps === 0;
  }

  /** At a coupling step: advance the SST from the ocean, let the atmosphere answer, refill the stress. */
  private coupleIfDue(): void {
    if (!this.couplingDue()) return;
    this.coupling!.couple(this.state, this.taux, this.tauy);
    this.windFilledFor = Number.NaN;
  }

  /** The coupled run's eastern SST index and warm-water volume now; null without an answering wind. */
  coupledIndices(): CoupledIndices | null {
    return this.coupling ? this.coupling.indices(this.state) : null;
  }

  /** One step done: the count goes up and the time is read from it, never accumulated. */
  private tick(): void {
    const s = this.state;
    s.steps++;
    s.time = this.clock.timeAt(s.steps);
  }

  /** Steps needed to reach a model time (s) from the current one. */
  stepsUntil(timeSeconds: number): number {
    return Math.max(0, Math.round((timeSeconds - this.state.time) / this.dt));
  }

  integrals(): Integrals {
    const budget = this.state.volumeBudget!;
    return integrals(this.grid, this.physics, this.state, this.dt, {
      anomalyAtStart: budget.anomalyAtStart,
      spongeMeasured: this.nonlinear ? budget.spongeMeasured : null,
    });
  }

  fieldContext(): FieldContext {
    return {
      grid: this.grid,
      physics: this.physics,
      state: this.state,
      taux: this.taux,
      tauy: this.tauy,
      fCentre: this.fCentre,
      atmosphere: this.coupling?.centredWind() ?? null,
    };
  }

  /** One output field at cell centres (nx * ny, south-west first); land is NaN. */
  field(
    name: FieldName,
    out: Float32Array | Float64Array = new Float64Array(this.grid.nx * this.grid.ny),
  ): Float32Array | Float64Array {
    centredField(name, this.fieldContext(), out);
    return out;
  }

  /** The implementation of the one-thread step (strips: stripKernel says what they run). */
  get kernel(): KernelName {
    return this.stepKernel;
  }

  /** Fill the stress for a step starting at time t (s) when the wind asks for it. */
  private updateWind(t: number): void {
    const w = this.wind;
    if (w.steady) {
      if (!Number.isNaN(this.windFilledFor)) return;
    } else if (w.updateSeconds && w.updateSeconds > 0) {
      const slot = Math.floor(t / w.updateSeconds);
      if (slot === this.windFilledFor) return;
      this.windFilledFor = slot;
    }
    w.fill(t, this.taux, this.tauy);
    if (w.steady) this.windFilledFor = 0;
    (this.team ?? this.stepper).setStress(this.taux, this.tauy);
  }

  /** Scan for NaN, a vanished layer and runaway speed; report the first bad point. */
  checkHealth(): void {
    const { nx, ny, W, ocean } = this.grid;
    const { u, v, h } = this.state;
    const H = this.physics.layerThickness;
    const limit2 = RUNAWAY_SPEED * RUNAWAY_SPEED;
    // A cheap test of every cell (no square root; NaN fails every comparison), and the exact
    // checks with their messages only where it fails: the scan runs every HEALTH_EVERY steps on
    // the leading thread while strip workers wait, so its cost counts twice.
    for (let j = 0; j < ny; j++) {
      const row = (j + 1) * W + 1;
      for (let k = row; k < row + nx; k++) {
        if (!ocean[k]) continue;
        const uc = 0.5 * (u[k] + u[k + 1]);
        const vc = 0.5 * (v[k] + v[k + W]);
        const thick = H + h[k];
        // NaN fails every comparison; +Infinity passes "> 0" but is no layer either.
        if (!(thick > 0 && thick < Infinity && uc * uc + vc * vc <= limit2)) this.checkCell(k - row, j, k);
      }
    }
  }

  /** The exact checks of one cell, with the report of what went wrong there. */
  private checkCell(i: number, j: number, k: number): void {
    const { W } = this.grid;
    const { u, v, h } = this.state;
    const H = this.physics.layerThickness;
    const uc = 0.5 * (u[k] + u[k + 1]);
    const vc = 0.5 * (v[k] + v[k + W]);
    const speed = Math.sqrt(uc * uc + vc * vc);
    const thick = H + h[k];
    if (Number.isNaN(thick) || Number.isNaN(speed)) {
      this.blowUp('not-a-number', i, j, 'the solution became NaN', this.stabilityHint());
    }
    // An infinite thickness is no layer either (a thickness of +Infinity passes "<= 0").
    if (thick === Infinity)
      this.blowUp('not-a-number', i, j, 'the layer thickness became infinite', this.stabilityHint());
    if (thick <= 0) {
      this.blowUp(
        'layer-vanished',
        i,
        j,
        `the upper layer vanished (thickness ${thick.toFixed(1)} m, the thermocline reached the surface)`,
        this.gridScaleAt(k)
          ? `The thickness alternates in sign from one cell to the next there: that is the scheme going unstable, not the wind lifting the thermocline. ${this.stabilityHint()}`
          : this.physics.mode === 'linear'
            ? 'The linear model cannot outcrop: weaken the wind, thicken the layer, or use the nonlinear mode with entrainment.'
            : 'Raise the entrainment minimum thickness or shorten its time, or weaken the wind.',
      );
    }
    if (speed > RUNAWAY_SPEED) {
      this.blowUp(
        'runaway-speed',
        i,
        j,
        `the current reached ${speed.toFixed(1)} m/s (limit ${RUNAWAY_SPEED} m/s)`,
        this.stabilityHint(),
      );
    }
  }

  /**
   * True when h' at cell k and at least three of its ocean neighbours alternate in sign with
   * comparable size: a two-grid-interval pattern, which a wind cannot draw but an unstable step does.
   */
  private gridScaleAt(k: number): boolean {
    const { h } = this.state;
    const { ocean, W } = this.grid;
    let opposite = 0;
    for (const n of [k - 1, k + 1, k - W, k + W])
      if (ocean[n] && h[n] * h[k] < 0 && Math.abs(h[n]) > 0.3 * Math.abs(h[k])) opposite++;
    return opposite >= 3;
  }

  private stabilityHint(): string {
    const ratio = this.dt / this.limit.dtMax;
    return `The time step is ${this.dt.toFixed(0)} s, ${(100 * ratio).toFixed(0)}% of the ${this.limit.limitingTerm} limit ${this.limit.dtMax.toFixed(0)} s: try a shorter time step, more viscosity or friction, or a weaker wind.`;
  }

  private blowUp(cause: BlowUpError['reason'], i: number, j: number, detail: string, hint: string): never {
    throw new BlowUpError(cause, this.day, this.grid.lonCentre[i], this.grid.latCentre[j], detail, hint);
  }

  /** f at a latitude with this run's Coriolis choice. */
  coriolisAt(latDeg: number): number {
    return coriolisParameter(this.physics, latDeg, (latDeg * Math.PI * this.physics.earthRadius) / 180);
  }
}

function checkPhysics(p: PhysicsConfig): void {
  const positive: Array<[keyof PhysicsConfig, string]> = [
    ['reducedGravity', "reduced gravity g' must be > 0 m s-2"],
    ['layerThickness', 'layer thickness H must be > 0 m'],
    ['density', 'density rho0 must be > 0 kg m-3'],
    ['earthRadius', 'Earth radius must be > 0 m'],
    ['gravity', 'gravity must be > 0 m s-2'],
  ];
  for (const [key, msg] of positive) {
    const v = p[key] as number;
    if (!(v > 0) || !Number.isFinite(v)) throw new InputError(`${msg} (got ${v})`, `physics.${key}`);
  }
  for (const key of ['friction', 'viscosity', 'beta'] as const) {
    if (!(p[key] >= 0) || !Number.isFinite(p[key]))
      throw new InputError(`must be >= 0 (got ${p[key]})`, `physics.${key}`);
  }
  const sl = p.surfaceLayer;
  if (!(sl.depth > 0 && sl.depth < p.layerThickness)) {
    throw new InputError(
      `surface layer depth must lie between 0 and the layer thickness ${p.layerThickness} m (got ${sl.depth})`,
      'physics.surfaceLayer.depth',
    );
  }
  if (!(sl.damping > 0))
    throw new InputError(`surface layer damping must be > 0 (got ${sl.damping})`, 'physics.surfaceLayer.damping');
}

function checkSponge(grid: Grid, p: PhysicsConfig): void {
  const w = p.sponge.widthDeg;
  if (!(w >= 0)) throw new InputError(`sponge width must be >= 0 degrees (got ${w})`, 'basin.sponge.widthDeg');
  const height = grid.basin.latNorth - grid.basin.latSouth;
  if (2 * w >= height) {
    throw new InputError(
      `the two sponge bands (${w}° each) leave no interior in a basin ${height}° tall; make the bands narrower than ${height / 2}° or the basin taller`,
      'basin.sponge.widthDeg',
    );
  }
}
