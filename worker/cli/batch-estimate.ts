// The resources an array task asks Slurm for, estimated from the scenario: wall time from the
// grid, the steps and the records; memory from the model's arrays; CPUs from the threads each
// member runs on. The numbers are deliberately generous (a task that runs out of time or memory
// is killed and must run again), and each one can be given instead (--task-time, --task-memory,
// --task-cpus). The script's comment repeats this arithmetic for the user.
//
// Where the costs come from (this machine, 2 shared x86-64 cores, docs/performance.md and
// docs/ensembles.md): the linear step costs 8.6 ns (WebAssembly) to 15 ns (TypeScript) per cell,
// the nonlinear step 52 ns; writing a record costs about 70 ns per field value (centring the
// fields, encoding, the write); a 280 x 100 run of 1920 steps and 241 records of 10 fields took
// 7.0 s wall and 159 MiB resident, a 1120 x 400 run of 186 steps and 7 records 8.0 s and 361 MiB
// with 59 MiB of model arrays. The constants below take about twice those costs, for slower or
// busier cluster cores.

import { AUTO_MIN_CELLS_PER_STRIP } from '../../model/parallel/threads.ts';

export const COST = {
  /** s to start Node and Pycno, read the scenario and build the model. */
  startSeconds: 20,
  /** ns per cell and step. */
  linearStepNs: 25,
  nonlinearStepNs: 100,
  /** ns per field value written (cells x fields per record). */
  outputNs: 150,
  /** Parallel efficiency of the strips beyond one thread. */
  threadEfficiency: 0.7,
  /** Multiplier on the estimate of time, then rounded up to minutes; and the least time asked. */
  timeMargin: 2,
  minMinutes: 10,
  /** MiB: Node, tsx and Pycno before the model; per extra strip thread. */
  baseMiB: 160,
  threadMiB: 40,
  /** The model's arrays are counted this many times (the arrays, a record's fields, its encoding). */
  modelFactor: 4,
  memoryMargin: 1.5,
  minMemoryMiB: 256,
  /** Threads a member gets when the grid is large enough (linear dynamics only). */
  maxAutoThreads: 4,
} as const;

export interface EstimateInput {
  nx: number;
  ny: number;
  steps: number;
  outputs: number;
  fields: number;
  memoryBytes: number;
  mode: 'linear' | 'nonlinear';
  perTask: number;
  /** Threads asked for (null: chosen here from the grid). */
  threads: number | null;
}

export interface Estimate {
  threads: number;
  memberSeconds: number;
  /** Slurm --time value, e.g. "0:40:00", "1-02:00:00". */
  time: string;
  timeMinutes: number;
  /** Slurm --mem value in MiB, e.g. "512M". */
  mem: string;
  memMiB: number;
  cpus: number;
  /** The arithmetic, one line each, for the script's comment. */
  explain: string[];
}

/** Threads for a member: one, or up to 4 on a linear grid with 2 x AUTO_MIN_CELLS_PER_STRIP cells or more. */
export function chooseMemberThreads(cells: number, mode: 'linear' | 'nonlinear'): number {
  if (mode !== 'linear') return 1;
  return Math.max(1, Math.min(COST.maxAutoThreads, Math.floor(cells / AUTO_MIN_CELLS_PER_STRIP)));
}

export function slurmTime(minutes: number): string {
  const d = Math.floor(minutes / 1440);
  const h = Math.floor((minutes % 1440) / 60);
  const m = minutes % 60;
  const hm = `${d > 0 ? String(h).padStart(2, '0') : h}:${String(m).padStart(2, '0')}:00`;
  return d > 0 ? `${d}-${hm}` : hm;
}

const fmt = (x: number) => (x >= 100 ? x.toFixed(0) : x >= 10 ? x.toFixed(1) : x.toPrecision(2));

export function estimateTask(e: EstimateInput): Estimate {
  const cells = e.nx * e.ny;
  const threads = e.threads ?? chooseMemberThreads(cells, e.mode);
  const stepNs = e.mode === 'linear' ? COST.linearStepNs : COST.nonlinearStepNs;
  const speedup = threads > 1 ? threads * COST.threadEfficiency : 1;
  const stepS = (e.steps * cells * stepNs * 1e-9) / speedup;
  const outS = e.outputs * cells * e.fields * COST.outputNs * 1e-9;
  const memberSeconds = COST.startSeconds + stepS + outS;
  const timeMinutes = Math.max(COST.minMinutes, Math.ceil((memberSeconds * e.perTask * COST.timeMargin) / 60));
  const modelMiB = e.memoryBytes / (1024 * 1024);
  const rawMiB = COST.baseMiB + COST.modelFactor * modelMiB + COST.threadMiB * (threads - 1);
  const memMiB = Math.max(COST.minMemoryMiB, Math.ceil((rawMiB * COST.memoryMargin) / 64) * 64);
  const explain = [
    `grid ${e.nx} x ${e.ny} = ${cells} cells, ${e.steps} steps, ${e.outputs} records of ${e.fields} fields, ${e.mode} dynamics, ${threads} thread${threads > 1 ? 's' : ''} per member`,
    `time per member: ${COST.startSeconds} s to start + ${e.steps} x ${cells} x ${stepNs} ns per cell step${threads > 1 ? ` / (${threads} threads x ${COST.threadEfficiency})` : ''} = ${fmt(stepS)} s + ${e.outputs} x ${cells} x ${e.fields} x ${COST.outputNs} ns per value written = ${fmt(outS)} s; together ${fmt(memberSeconds)} s`,
    `time per task: ${fmt(memberSeconds)} s x ${e.perTask} member${e.perTask > 1 ? 's' : ''} x ${COST.timeMargin} (margin), in whole minutes, at least ${COST.minMinutes}: ${timeMinutes} min`,
    `memory: ${COST.baseMiB} MiB (Node and Pycno) + ${COST.modelFactor} x ${fmt(modelMiB)} MiB (model arrays, a record's fields and their encoding)${threads > 1 ? ` + ${threads - 1} x ${COST.threadMiB} MiB (strip threads)` : ''} = ${fmt(rawMiB)} MiB; x ${COST.memoryMargin}, in steps of 64 MiB, at least ${COST.minMemoryMiB}: ${memMiB} MiB`,
    `cpus: one per thread of a member run (${threads === 1 ? (e.mode === 'linear' ? `the grid has fewer than ${2 * AUTO_MIN_CELLS_PER_STRIP} cells, too few to gain from strips` : 'the nonlinear step runs on one thread') : `${cells} cells give ${threads} strips of at least ${AUTO_MIN_CELLS_PER_STRIP} cells, at most ${COST.maxAutoThreads}`}${e.threads !== null ? '; as given with --threads' : ''}): ${threads}`,
  ];
  return {
    threads,
    memberSeconds,
    time: slurmTime(timeMinutes),
    timeMinutes,
    mem: `${memMiB}M`,
    memMiB,
    cpus: threads,
    explain,
  };
}
