// npm run bench: Pycno's linear kernel against the shared C and NumPy references, side by side
// in one run. The references are built in a temporary folder from ../shared/refbench when it is
// there (it is read-only in CI and absent on a user's machine); their code is never copied into
// the project. Repetitions are interleaved and medians reported, since the machine is noisy.
//
//   npm run bench                 all sizes, 5 repetitions of about 1 s each
//   BENCH_REPEATS=3 BENCH_SECONDS=0.5 npm run bench      quicker
//   BENCH_PIN=1 npm run bench     every run under taskset -c 1 (one core, less migration noise;
//                                 the strip rows then get cores 0-1, one per thread)
//   BENCH_STRIPS=2,4 npm run bench  the thread counts of the strip rows, ts and wasm (default 2)

import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
const root = resolve(here, '../..');
const refDir = resolve(root, '../shared/refbench');
const repeats = Number(process.env.BENCH_REPEATS ?? 5);
const targetSeconds = Number(process.env.BENCH_SECONDS ?? 1);
const sizes: Array<[number, number]> = [
  [320, 120],
  [640, 240],
  [1280, 480],
];

interface Impl {
  label: string;
  cmd: string[];
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
  const strips = /^(?:ts|wasm)-strips-(\d+)$/.exec(impl.label);
  const cores = strips ? `0-${Number(strips[1]) - 1}` : '1';
  const [exe, ...args] = process.env.BENCH_PIN ? ['taskset', '-c', cores, ...impl.cmd] : impl.cmd;
  const r = spawnSync(exe, [...args, String(nx), String(ny), String(steps), impl.label], { encoding: 'utf8', cwd: root });
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

// Pycno's paths: plain TypeScript, WebAssembly SIMD, and latitude strips on worker threads running
// the TypeScript rows or the WebAssembly kernel over shared memory (all bit-identical to each other).
const line = [process.execPath, '--import', 'tsx', join(here, 'reference-line.ts')];
const stripCounts = (process.env.BENCH_STRIPS ?? '2').split(',').map(Number).filter((n) => n >= 2);
const ours = ['ts-double', 'wasm-simd', ...stripCounts.flatMap((n) => [`ts-strips-${n}`, `wasm-strips-${n}`])];
const impls: Impl[] = ours.map((label) => ({ label, cmd: line }));
let bandwidth: number | null = null;
let build: string | null = null;
if (existsSync(join(refDir, 'kernel.c')) && has('gcc', ['--version'])) {
  build = mkdtempSync(join(tmpdir(), 'pycno-refbench-'));
  const cc = (out: string, flags: string[], src = 'kernel.c') =>
    execFileSync('gcc', [...flags, join(refDir, src), '-o', join(build!, out), '-lm'], { stdio: 'inherit' });
  cc('kernel_O3n', ['-O3', '-march=native']);
  cc('kernel_O2', ['-O2']);
  impls.push({ label: 'c-double-O3-native', cmd: [join(build, 'kernel_O3n')] });
  impls.push({ label: 'c-double-O2', cmd: [join(build, 'kernel_O2')] });
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
  impls.push({ label: 'numpy-double', cmd: ['python3', join(refDir, 'kernel.py')] });
}

console.log(`== Pycno linear kernel against the references: ${repeats} interleaved repetitions of ~${targetSeconds} s, medians`);
const results = new Map<string, number>();
for (const [nx, ny] of sizes) {
  // Calibrate each implementation to about targetSeconds per run.
  const steps = new Map<string, number>();
  for (const impl of impls) {
    const cal = Math.max(5, Math.round(2e7 / (nx * ny)));
    const l = run(impl, nx, ny, cal);
    steps.set(impl.label, Math.max(5, Math.round((cal * targetSeconds) / Math.max(l.seconds, 1e-3))));
  }
  const cups = new Map<string, number[]>(impls.map((i) => [i.label, []]));
  const sums = new Map<string, Line>();
  for (let r = 0; r < repeats; r++) {
    for (const impl of impls) cups.get(impl.label)!.push(run(impl, nx, ny, steps.get(impl.label)!).cups);
  }
  // Checksums after the same 200 steps, so that the comparison is of the same computation.
  for (const impl of impls) sums.set(impl.label, run(impl, nx, ny, 200));
  const ref = sums.get('c-double-O2') ?? sums.get('ts-double')!;
  console.log(`\n${nx} x ${ny}`);
  for (const impl of impls) {
    const m = median(cups.get(impl.label)!);
    results.set(`${impl.label}@${nx}x${ny}`, m);
    const s = sums.get(impl.label)!;
    const rel = Math.max(Math.abs(s.sumEta / ref.sumEta - 1), Math.abs(s.energy / ref.energy - 1));
    console.log(
      `  ${impl.label.padEnd(20)} ${m.toExponential(3)} cups   checksum(200 steps) sum_eta=${s.sumEta.toExponential(12)} energy=${s.energy.toExponential(12)}  rel.diff ${rel.toExponential(1)}`,
    );
  }
  if (bandwidth) {
    // 16 arrays of 8 bytes per cell update for the three-pass kernel (refbench README).
    console.log(`  bandwidth ceiling (triad ${bandwidth} GB/s / 128 B): ${((bandwidth * 1e9) / 128).toExponential(3)} cups`);
  }
}

console.log('\nNonlinear step against the linear one, 640 x 240 (CPU time per cell update, medians):');
const cost = spawnSync(process.execPath, ['--import', 'tsx', join(here, 'nonlinear-cost.ts'), '640', '240', String(repeats)], { encoding: 'utf8', cwd: root });
process.stdout.write(cost.stdout);

const at = (label: string) => results.get(`${label}@640x240`);
const ts = at('ts-double')!;
const best = Math.max(...impls.filter((i) => ours.includes(i.label)).map((i) => at(i.label)!));
console.log('');
for (const label of ours) {
  if (at('c-double-O2')) console.log(`ratio ${label}/c-O2 ${(at(label)! / at('c-double-O2')!).toFixed(3)}`);
  if (at('c-double-O3-native')) console.log(`ratio ${label}/c-O3 ${(at(label)! / at('c-double-O3-native')!).toFixed(3)}`);
}
for (const n of stripCounts) console.log(`speed-up ts-strips-${n}/ts-double ${(at(`ts-strips-${n}`)! / ts).toFixed(3)}`);
for (const n of stripCounts) console.log(`speed-up wasm-strips-${n}/wasm-simd ${(at(`wasm-strips-${n}`)! / at('wasm-simd')!).toFixed(3)}`);
if (at('numpy-double')) console.log(`ratio ts/numpy ${(ts / at('numpy-double')!).toFixed(3)}`);
if (build) rmSync(build, { recursive: true, force: true });
if (at('c-double-O2')) console.log(`ratio ts/c-O2 ${(ts / at('c-double-O2')!).toFixed(3)}`);
if (at('c-double-O3-native')) console.log(`ratio best/c-O3 ${(best / at('c-double-O3-native')!).toFixed(3)}`);
