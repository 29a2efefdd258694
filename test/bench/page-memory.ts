// npm run bench:memory: the memory of a one-year 640 x 240 run with a snapshot every 5 days,
//   (a) in the command line: `pycno run` under /usr/bin/time -v (maximum resident size), and the
//       output file's size;
//   (b) in the page: the same scenario run to its end at full speed in Chromium, then
//       performance.measureUserAgentSpecificMemory() (the page is cross-origin isolated), the
//       main thread's V8 heap (CDP Runtime.getHeapUsage), the resident size of every Chromium
//       process, and what the time slider and the run record say they keep.
// A benchmark: it prints figures and asserts nothing.
//
//   npm run bench:memory
//   BENCH_MEMORY_SKIP_CLI=1 npm run bench:memory      the page only

import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { ROOT } from '../support/browser-harness.ts';
import { benchScenario, BENCH_NX, BENCH_NY } from './page-scenario.ts';
import { loadScenario, openPage, pageInfo } from './page-common.ts';

const DAYS = 365;
const EVERY = 5;
const mb = (b: number) => `${(b / 1e6).toFixed(0)} MB`;
const scenario = benchScenario({ days: DAYS, outputEveryDays: EVERY });
const dir = mkdtempSync(join(tmpdir(), 'pycno-memory-'));
const rows: Array<[string, string]> = [];
const row = (k: string, v: string) => {
  rows.push([k, v]);
  console.log(`${k}: ${v}`);
};

/** Resident size of a process and all its descendants, from ps (kB), by command kind. */
function treeRss(root: number): Map<string, number> {
  const out = execFileSync('ps', ['-eo', 'pid=,ppid=,rss=,args='], { encoding: 'utf8' });
  const procs = out
    .trim()
    .split('\n')
    .map((l) => {
      const m = /^\s*(\d+)\s+(\d+)\s+(\d+)\s+(.*)$/.exec(l)!;
      return { pid: Number(m[1]), ppid: Number(m[2]), rss: Number(m[3]) * 1024, args: m[4] };
    });
  const inTree = new Set([root]);
  for (let grew = true; grew; ) {
    grew = false;
    for (const p of procs) {
      if (!inTree.has(p.pid) && inTree.has(p.ppid)) {
        inTree.add(p.pid);
        grew = true;
      }
    }
  }
  const kinds = new Map<string, number>();
  for (const p of procs) {
    if (!inTree.has(p.pid) || !/chrom/i.test(p.args)) continue;
    const kind = /--type=renderer/.test(p.args)
      ? 'renderer'
      : /--type=gpu-process/.test(p.args)
        ? 'gpu-process'
        : /--type=/.test(p.args)
          ? 'other helpers'
          : 'browser';
    kinds.set(kind, (kinds.get(kind) ?? 0) + p.rss);
  }
  return kinds;
}

try {
  console.log(
    `one-year run: ${BENCH_NX} x ${BENCH_NY}, ${DAYS} days, a snapshot every ${EVERY} days, all 10 fields; load average ${loadavg()
      .map((x) => x.toFixed(2))
      .join(' ')}`,
  );
  // ---- (a) the command line ----
  if (process.env.BENCH_MEMORY_SKIP_CLI !== '1') {
    const file = join(dir, 'year.json');
    const out = join(dir, 'year.nc');
    writeFileSync(file, JSON.stringify(scenario, null, 2));
    const cmd = [process.execPath, join(ROOT, 'bin/pycno.js'), 'run', file, '--out', out, '--quiet'];
    const t0 = Date.now();
    const timed = existsSync('/usr/bin/time');
    const r = timed
      ? spawnSync('/usr/bin/time', ['-v', ...cmd], { encoding: 'utf8' })
      : spawnSync(cmd[0], cmd.slice(1), { encoding: 'utf8' });
    const wall = (Date.now() - t0) / 1000;
    if (r.status !== 0) throw new Error(`pycno run failed (exit ${r.status}): ${r.stderr}`);
    const rss = /Maximum resident set size \(kbytes\): (\d+)/.exec(r.stderr ?? '');
    row('cli command', `/usr/bin/time -v node bin/pycno.js run year.json --out year.nc --quiet`);
    row('cli wall time', `${wall.toFixed(1)} s`);
    row('cli maximum resident size', rss ? mb(Number(rss[1]) * 1024) : 'not measured (/usr/bin/time is missing)');
    row('cli output file', `${mb(statSync(out).size)} (${statSync(out).size} bytes)`);
    rmSync(out, { force: true });
  }

  // ---- (b) the page ----
  // Eager measurement: measureUserAgentSpecificMemory otherwise waits for the next natural GC.
  const bench = await openPage(['--enable-blink-features=ForceEagerMeasureMemory']);
  try {
    const { page } = bench;
    await loadScenario(page, scenario, 'max');
    const t0 = Date.now();
    await page.click('#btn-run');
    await page.waitForFunction(
      () => (window as unknown as { __pycno: { status: string } }).__pycno.status === 'finished',
      null,
      { timeout: 1_800_000, polling: 1000 },
    );
    const wall = (Date.now() - t0) / 1000;
    // Let the last frame draw and the page settle before measuring.
    await page.waitForTimeout(1500);
    const end = await pageInfo(page);
    const cdp = await page.context().newCDPSession(page);
    await cdp.send('HeapProfiler.collectGarbage');
    const heap = (await cdp.send('Runtime.getHeapUsage')) as { usedSize: number; totalSize: number };
    const ua = await page.evaluate(async () => {
      const p = performance as unknown as {
        measureUserAgentSpecificMemory?: () => Promise<{
          bytes: number;
          breakdown: Array<{ bytes: number; types: string[]; attribution: Array<{ scope: string }> }>;
        }>;
      };
      if (!crossOriginIsolated || !p.measureUserAgentSpecificMemory) return null;
      const r = await p.measureUserAgentSpecificMemory();
      const by = new Map<string, number>();
      for (const b of r.breakdown) {
        const key =
          `${b.attribution.map((a) => a.scope).join('+') || 'unattributed'} ${b.types.join('+') || ''}`.trim();
        by.set(key, (by.get(key) ?? 0) + b.bytes);
      }
      return { bytes: r.bytes, breakdown: [...by.entries()] };
    });
    const kept = await page.evaluate(() =>
      (
        window as unknown as {
          __pycno: { kept: () => { frames: number; bytes: number; budget: number; oldestDay: number | null } };
        }
      ).__pycno.kept(),
    );
    const notes = await page.evaluate(() => ({
      budget: document.getElementById('budget-note')?.textContent ?? '',
      live: document.getElementById('lib-live-note')?.textContent ?? '',
    }));
    const procs = treeRss(process.pid);
    row(
      'page run',
      `${end.lastDay.toFixed(0)} days in ${wall.toFixed(0)} s (${(end.lastDay / wall).toFixed(1)} model days/s), ${end.framesReceived} frames received`,
    );
    row('page measureUserAgentSpecificMemory', ua ? `${mb(ua.bytes)} in all (page and worker)` : 'not available');
    if (ua) for (const [k, v] of ua.breakdown) row(`  ${k}`, mb(v));
    row('page main-thread V8 heap after GC', `${mb(heap.usedSize)} used of ${mb(heap.totalSize)}`);
    for (const [k, v] of procs) row(`chromium ${k} resident size`, mb(v));
    row(
      'time slider keeps',
      `${kept.frames} frames, ${mb(kept.bytes)} of a ${mb(kept.budget)} budget, oldest day ${kept.oldestDay?.toFixed(1) ?? '-'}`,
    );
    row('time slider note', notes.budget);
    row('run record note', notes.live || '(none: every snapshot fits its limit)');
  } finally {
    await bench.close();
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}
