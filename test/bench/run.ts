// npm run bench: Pycno's paths against the shared C and NumPy references, side by side in one run,
// and one `ratio` line per target of docs/performance.md with the spread of the repetitions.
// The references are built in a temporary folder from ../shared/refbench when it is there (it is
// read-only in CI and absent on a user's machine); their code is never copied into the project.
// Repetitions are interleaved (every path once, then again), medians reported, and each ratio's
// spread is that of the ratios of the same repetition, since the machine is shared and noisy.
//
//   npm run bench                       640 x 240, 5 repetitions of about 1 s each
//   BENCH_REPEATS=3 BENCH_SECONDS=0.5 npm run bench      quicker
//   BENCH_SIZES=320x120,640x240,1280x480 npm run bench   more sizes (the ratios are at 640 x 240)
//   BENCH_PIN=1 npm run bench           one-thread runs under taskset -c 1, N-strip runs on cores 0..N-1
//   BENCH_STRIPS=2,4 npm run bench      the thread counts of the strip rows (default 2)
//   BENCH_ONLY=regex npm run bench      only the paths whose label matches

import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
const root = resolve(here, '../..');
// ../shared/refbench beside the project (a git worktree sits one level deeper), or BENCH_REFBENCH.
const refDir =
  process.env.BENCH_REFBENCH ??
  [resolve(root, '../shared/refbench'), resolve(root, '../../shared/refbench')].find((d) => existsSync(d)) ??
  resolve(root, '../shared/refbench');
const repeats = Number(process.env.BENCH_REPEATS ?? 5);
const targetSeconds = Number(process.env.BENCH_SECONDS ?? 1);
const sizes = (process.env.BENCH_SIZES ?? '640x240')
  .split(',')
  .map((s) => s.split('x').map(Number) as [number, number]);
const only = new RegExp(process.env.BENCH_ONLY ?? '.');
const AT = '640x240';

interface Impl {
  label: string;
  cmd: string[];
  /** Arguments after NX NY STEPS LABEL (NumPy's --float32). */
  tail?: string[];
  /** The label whose checksum this one should reach. */
  ref: string;
}

interface Line {
  seconds: number;
  cups: number;
  sumEta: number;
  energy: number;
}

function parse(out: string): Line {
  const field = (name: string) => {
    const m = new RegExp(`${name}=(\\S+)`).exec(out);
    if (!m) throw new Error(`no ${name} in: ${out}`);
    return Number(m[1]);
  };
  return { seconds: field('seconds'), cups: field('cups'), sumEta: field('sum_eta'), energy: field('energy') };
}

function run(impl: Impl, nx: number, ny: number, steps: number): Line {
  const strips = /strips-(\d+)$/.exec(impl.label);
  const cores = strips ? `0-${Number(strips[1]) - 1}` : '1';
  const [exe, ...args] = process.env.BENCH_PIN ? ['taskset', '-c', cores, ...impl.cmd] : impl.cmd;
  const r = spawnSync(exe, [...args, String(nx), String(ny), String(steps), impl.label, ...(impl.tail ?? [])], {
    encoding: 'utf8',
    cwd: root,
  });
  if (r.status !== 0) throw new Error(`${impl.label} failed: ${r.stderr}`);
  return parse(r.stdout);
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const n = s.length;
  return n % 2 ? s[(n - 1) / 2] : 0.5 * (s[n / 2 - 1] + s[n / 2]);
};

function has(cmd: string, args: string[]): boolean {
  return spawnSync(cmd, args, { encoding: 'utf8' }).status === 0;
}

// Pycno's paths (test/bench/reference-line.ts), all bit-identical to each other within a mode and
// precision: plain TypeScript, WebAssembly SIMD, latitude strips on worker threads, float32, and
// the nonlinear step.
const line = [process.execPath, '--import', 'tsx', join(here, 'reference-line.ts')];
const stripCounts = (process.env.BENCH_STRIPS ?? '2')
  .split(',')
  .map(Number)
  .filter((n) => n >= 2);
const ours: Array<[string, string]> = [
  ['ts-double', 'c-double-O2'],
  ['wasm-simd', 'c-double-O2'],
  ...stripCounts.flatMap(
    (n): Array<[string, string]> => [
      [`ts-strips-${n}`, 'c-double-O2'],
      [`wasm-strips-${n}`, 'c-double-O2'],
    ],
  ),
  ['ts-float32', 'c-float-O2'],
  ['wasm-float32', 'c-float-O2'],
  ...stripCounts.map((n): [string, string] => [`wasm-float32-strips-${n}`, 'c-float-O2']),
  ['nl-ts', 'nl-ts'],
  ['nl-wasm', 'nl-ts'],
  ...stripCounts.map((n): [string, string] => [`nl-wasm-strips-${n}`, 'nl-ts']),
  ['nl-wasm-float32', 'nl-ts'],
];
const impls: Impl[] = ours.map(([label, ref]) => ({ label, cmd: line, ref }));
let bandwidth: number | null = null;
let build: string | null = null;
if (existsSync(join(refDir, 'kernel.c')) && has('gcc', ['--version'])) {
  build = mkdtempSync(join(tmpdir(), 'pycno-refbench-'));
  const cc = (out: string, flags: string[], src = 'kernel.c') =>
    execFileSync('gcc', [...flags, join(refDir, src), '-o', join(build!, out), '-lm'], { stdio: 'inherit' });
  cc('kernel_O3n', ['-O3', '-march=native']);
  cc('kernel_O2', ['-O2']);
  cc('kernel_f_O3n', ['-O3', '-march=native', '-DUSE_FLOAT']);
  cc('kernel_f_O2', ['-O2', '-DUSE_FLOAT']);
  impls.push({ label: 'c-double-O3-native', cmd: [join(build, 'kernel_O3n')], ref: 'c-double-O2' });
  impls.push({ label: 'c-double-O2', cmd: [join(build, 'kernel_O2')], ref: 'c-double-O2' });
  impls.push({ label: 'c-float-O3-native', cmd: [join(build, 'kernel_f_O3n')], ref: 'c-float-O2' });
  impls.push({ label: 'c-float-O2', cmd: [join(build, 'kernel_f_O2')], ref: 'c-float-O2' });
  if (existsSync(join(refDir, 'bandwidth.c'))) {
    cc('bandwidth', ['-O3', '-march=native'], 'bandwidth.c');
    const out = execFileSync(join(build, 'bandwidth'), ['10', '15'], { encoding: 'utf8' });
    const m = /triad.*median\s+([\d.]+)/.exec(out);
    if (m) bandwidth = Number(m[1]);
  }
} else {
  console.log('(no ../shared/refbench with gcc here: Pycno figures only)');
}
if (existsSync(join(refDir, 'kernel.py')) && has('python3', ['-c', 'import numpy'])) {
  impls.push({ label: 'numpy-double', cmd: ['python3', join(refDir, 'kernel.py')], ref: 'c-double-O2' });
  impls.push({
    label: 'numpy-float',
    cmd: ['python3', join(refDir, 'kernel.py')],
    tail: ['--float32'],
    ref: 'c-float-O2',
  });
}
const chosen = impls.filter((i) => only.test(i.label));

const load0 = loadavg();
console.log(
  `== Pycno against the references: ${repeats} interleaved repetitions of ~${targetSeconds} s, medians; load average ${load0.map((x) => x.toFixed(2)).join(' ')}`,
);
/** cups of each repetition, by label@size. */
const reps = new Map<string, number[]>();
for (const [nx, ny] of sizes) {
  // Calibrate each path to about targetSeconds per run.
  const steps = new Map<string, number>();
  for (const impl of chosen) {
    const cal = Math.max(5, Math.round(2e7 / (nx * ny)));
    const l = run(impl, nx, ny, cal);
    steps.set(impl.label, Math.max(5, Math.round((cal * targetSeconds) / Math.max(l.seconds, 1e-3))));
  }
  for (const impl of chosen) reps.set(`${impl.label}@${nx}x${ny}`, []);
  for (let r = 0; r < repeats; r++) {
    for (const impl of chosen)
      reps.get(`${impl.label}@${nx}x${ny}`)!.push(run(impl, nx, ny, steps.get(impl.label)!).cups);
  }
  // Checksums after the same 200 steps, so that the comparison is of the same computation.
  const sums = new Map<string, Line>();
  for (const impl of chosen) sums.set(impl.label, run(impl, nx, ny, 200));
  console.log(`\n${nx} x ${ny}        cell updates/s: median (min-max)      checksum after 200 steps (against)`);
  for (const impl of chosen) {
    const xs = reps.get(`${impl.label}@${nx}x${ny}`)!;
    const s = sums.get(impl.label)!;
    const ref = sums.get(impl.ref);
    const rel = ref ? Math.max(Math.abs(s.sumEta / ref.sumEta - 1), Math.abs(s.energy / ref.energy - 1)) : NaN;
    console.log(
      `  ${impl.label.padEnd(22)} ${median(xs).toExponential(3)} (${Math.min(...xs).toExponential(2)}-${Math.max(...xs).toExponential(2)})   sum_eta=${s.sumEta.toExponential(12)} energy=${s.energy.toExponential(12)}  rel.diff ${Number.isFinite(rel) ? rel.toExponential(1) : '-'} (${impl.ref})`,
    );
  }
  if (bandwidth) {
    // 16 arrays of 8 bytes per cell update for the three-pass kernel (refbench README), 4 in float32.
    console.log(
      `  bandwidth ceiling (triad ${bandwidth} GB/s / 128 B, float32 / 64 B): ${((bandwidth * 1e9) / 128).toExponential(3)}, ${((bandwidth * 1e9) / 64).toExponential(3)} cups`,
    );
  }
}
const load1 = loadavg();

// The targets, each as one ratio of the same repetitions at 640 x 240.
const at = (label: string): number[] | undefined => reps.get(`${label}@${AT}`);
const perRep = (f: (r: number) => number | undefined): number[] =>
  Array.from({ length: repeats }, (_, r) => f(r)).filter((x): x is number => x !== undefined && Number.isFinite(x));
/** The faster of several paths in each repetition. */
const best = (labels: string[]) => (r: number) => {
  const xs = labels.map((l) => at(l)?.[r]).filter((x): x is number => x !== undefined);
  return xs.length ? Math.max(...xs) : undefined;
};
const one = (label: string) => (r: number) => at(label)?.[r];
const ratio = (a: (r: number) => number | undefined, b: (r: number) => number | undefined) =>
  perRep((r) => {
    const x = a(r);
    const y = b(r);
    return x !== undefined && y !== undefined ? x / y : undefined;
  });
const stripsOf = (prefix: string) => stripCounts.map((n) => `${prefix}strips-${n}`);
const doubleBrowser = ['wasm-simd', ...stripsOf('wasm-'), 'ts-double', ...stripsOf('ts-')];
const floatBrowser = ['wasm-float32', ...stripsOf('wasm-float32-'), 'ts-float32'];
const n2 = stripCounts[0];
const targets: Array<{ name: string; xs: number[]; op: '>=' | '<='; goal: number }> = [
  { name: 'ts/c-O2', xs: ratio(one('ts-double'), one('c-double-O2')), op: '>=', goal: 0.8 },
  { name: 'ts/numpy', xs: ratio(one('ts-double'), one('numpy-double')), op: '>=', goal: 5 },
  {
    name: 'best/c-O3 (double, one core per thread)',
    xs: ratio(best(doubleBrowser), one('c-double-O3-native')),
    op: '>=',
    goal: 0.8,
  },
  // a cost per cell: linear cups over nonlinear cups
  {
    name: 'nonlinear-wasm/linear-wasm (cost per cell)',
    xs: ratio(one('wasm-simd'), one('nl-wasm')),
    op: '<=',
    goal: 1.6,
  },
  {
    name: `strips speed-up linear (wasm-strips-${n2}/wasm-simd)`,
    xs: ratio(one(`wasm-strips-${n2}`), one('wasm-simd')),
    op: '>=',
    goal: 1.7,
  },
  {
    name: `strips speed-up nonlinear (nl-wasm-strips-${n2}/nl-wasm)`,
    xs: ratio(one(`nl-wasm-strips-${n2}`), one('nl-wasm')),
    op: '>=',
    goal: 1.7,
  },
  { name: 'float32 wasm/c-float-O3', xs: ratio(one('wasm-float32'), one('c-float-O3-native')), op: '>=', goal: 0.8 },
  { name: 'float32 wasm/c-float-O2', xs: ratio(one('wasm-float32'), one('c-float-O2')), op: '>=', goal: 0.8 },
  {
    name: 'float32 best/c-O3 (float32 counted separately)',
    xs: ratio(best(floatBrowser), one('c-double-O3-native')),
    op: '>=',
    goal: 0.8,
  },
  { name: 'float32 wasm/double wasm', xs: ratio(one('wasm-float32'), one('wasm-simd')), op: '>=', goal: 1 },
];
console.log(
  `\nRatios at ${AT} (median of the ratios of each repetition, their range, and the target); load average at the end ${load1.map((x) => x.toFixed(2)).join(' ')}:`,
);
for (const t of targets) {
  if (t.xs.length === 0) continue;
  const m = median(t.xs);
  const met = t.op === '>=' ? m >= t.goal : m <= t.goal;
  console.log(
    `ratio ${t.name} ${m.toFixed(3)}  (repetitions ${Math.min(...t.xs).toFixed(3)}-${Math.max(...t.xs).toFixed(3)}, n=${t.xs.length}; target ${t.op} ${t.goal}: ${met ? 'met' : 'not met'})`,
  );
}
if (build) rmSync(build, { recursive: true, force: true });
