// npm run bench:page: how smooth the page stays while a 640 x 240 run goes at full speed with the
// surface-current arrows on. Builds and serves the page, loads the benchmark basin through the
// page's file input, runs it, and measures on the main thread for a fixed time:
//   - frames per second from requestAnimationFrame intervals (mean, median, 5th percentile),
//   - long tasks (PerformanceObserver 'longtask': count, total, longest),
//   - frames received from the engine and drawn, per second, and model days per second,
//   - main-thread script, task, layout and style time (CDP Performance metrics), per drawn frame,
//   - with BENCH_PAGE_PROFILE=1, the functions with the most self time (CDP Profiler).
// A benchmark, not a test: it prints and asserts nothing about speed. The last line is
// `page fps X` (the median).
//
//   npm run bench:page
//   BENCH_PAGE_SECONDS=20 BENCH_PAGE_PROFILE=1 npm run bench:page   longer, with a JS profile
//   BENCH_PAGE_TRACE=1 npm run bench:page      renderer main-thread trace events (Chromium tracing);
//                                              BENCH_PAGE_TRACE_FILE=t.json also keeps the trace
//   BENCH_PAGE_SPEED=20 npm run bench:page     a speed cap (model days/s) instead of full speed
//   BENCH_PAGE_ARGS="--flag" npm run bench:page  extra Chromium flags
//   BENCH_PAGE_WIDTH=800 npm run bench:page    a narrower window (a smaller map canvas)

import { writeFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import type { CDPSession } from 'playwright-core';
import { benchScenario, BENCH_NX, BENCH_NY } from './page-scenario.ts';
import { loadScenario, median, openPage, pageInfo, quantile } from './page-common.ts';

const seconds = Number(process.env.BENCH_PAGE_SECONDS ?? 15);
const warmup = Number(process.env.BENCH_PAGE_WARMUP ?? 2);
const profile = process.env.BENCH_PAGE_PROFILE === '1';
const trace = process.env.BENCH_PAGE_TRACE === '1';
const outputEveryDays = Number(process.env.BENCH_PAGE_OUTPUT_DAYS ?? 1);
const speed = (process.env.BENCH_PAGE_SPEED ?? 'max') as '5' | '20' | '60' | 'max';

interface Probe {
  raf: number[];
  longTasks: Array<{ start: number; duration: number }>;
}

interface GpuCounts {
  fieldUploads: number;
  arrowUploads: number;
  glDraws: number;
  overlayDraws: number;
}

type Metrics = Record<string, number>;

async function metrics(cdp: CDPSession): Promise<Metrics> {
  const r = (await cdp.send('Performance.getMetrics')) as { metrics: Array<{ name: string; value: number }> };
  return Object.fromEntries(r.metrics.map((m) => [m.name, m.value]));
}

interface ProfileNode {
  id: number;
  callFrame: { functionName: string; url: string; lineNumber: number };
}

/** Self time per function from a CPU profile, largest first. */
function selfTimes(p: {
  nodes: ProfileNode[];
  samples: number[];
  timeDeltas: number[];
}): Array<{ name: string; ms: number }> {
  const byId = new Map(p.nodes.map((n) => [n.id, n]));
  const ms = new Map<string, number>();
  p.samples.forEach((id, k) => {
    const n = byId.get(id)!;
    const f = n.callFrame;
    const file = f.url.split('/').pop() ?? '';
    const key = `${f.functionName || '(anonymous)'} ${file ? `${file}:${f.lineNumber + 1}` : ''}`.trim();
    const dt = (p.timeDeltas[k + 1] ?? 0) / 1000;
    ms.set(key, (ms.get(key) ?? 0) + dt);
  });
  return [...ms.entries()].map(([name, v]) => ({ name, ms: v })).sort((a, b) => b.ms - a.ms);
}

interface TraceEvent {
  ph: string;
  name: string;
  pid: number;
  tid: number;
  dur?: number;
  args?: { name?: string };
}

/** Complete events on the page's renderer main thread, summed by name. */
function traceSummary(t: { traceEvents: TraceEvent[] }): Array<{ name: string; ms: number; count: number }> {
  const main = t.traceEvents
    .filter((e) => e.ph === 'M' && e.name === 'thread_name' && e.args?.name === 'CrRendererMain')
    .map((e) => `${e.pid}:${e.tid}`);
  const on = new Set(main);
  const sum = new Map<string, { ms: number; count: number }>();
  for (const e of t.traceEvents) {
    if (e.ph !== 'X' || !on.has(`${e.pid}:${e.tid}`)) continue;
    const s = sum.get(e.name) ?? { ms: 0, count: 0 };
    s.ms += (e.dur ?? 0) / 1000;
    s.count++;
    sum.set(e.name, s);
  }
  return [...sum.entries()].map(([name, v]) => ({ name, ...v })).sort((a, b) => b.ms - a.ms);
}

// Extra Chromium flags, space-separated (e.g. to try GPU compositing over SwiftShader).
const extraArgs = (process.env.BENCH_PAGE_ARGS ?? '').split(/\s+/).filter(Boolean);
// A profile reads better with our function names, so it gets an unminified build.
const width = Number(process.env.BENCH_PAGE_WIDTH ?? 1280);
const bench = await openPage(extraArgs, { minify: !profile, width });
try {
  const { page } = bench;
  const scenario = benchScenario({ days: 730, outputEveryDays });
  await loadScenario(page, scenario, speed);
  const arrowsOn = await page.isChecked('#show-currents');
  if (!arrowsOn) await page.check('#show-currents');

  const cdp = await page.context().newCDPSession(page);
  await cdp.send('Performance.enable');
  await page.click('#btn-run');
  await page.waitForTimeout(warmup * 1000);

  const load = loadavg();
  if (profile) {
    await cdp.send('Profiler.enable');
    await cdp.send('Profiler.setSamplingInterval', { interval: 250 });
    await cdp.send('Profiler.start');
  }
  if (trace)
    await bench.browser.startTracing(page, {
      categories: [
        'devtools.timeline',
        'disabled-by-default-devtools.timeline',
        'v8',
        'blink',
        'cc',
        'gpu',
        'toplevel',
      ],
    });
  const gpu = () => page.evaluate(() => ({ ...(window as unknown as { __pycno: { gpu: GpuCounts } }).__pycno.gpu }));
  const g0 = await gpu();
  const before = await pageInfo(page);
  const m0 = await metrics(cdp);
  await page.evaluate(() => {
    const probe: Probe = { raf: [], longTasks: [] };
    const w = window as unknown as { __bench: Probe & { stop?: boolean } };
    w.__bench = probe;
    const tick = (t: number) => {
      probe.raf.push(t);
      if (!w.__bench.stop) requestAnimationFrame(tick);
    };
    requestAnimationFrame(tick);
    new PerformanceObserver((l) => {
      for (const e of l.getEntries()) probe.longTasks.push({ start: e.startTime, duration: e.duration });
    }).observe({ type: 'longtask', buffered: false });
  });
  const t0 = Date.now();
  await page.waitForTimeout(seconds * 1000);
  const probe = await page.evaluate(() => {
    const w = window as unknown as { __bench: Probe & { stop?: boolean } };
    w.__bench.stop = true;
    return { raf: w.__bench.raf, longTasks: w.__bench.longTasks };
  });
  const wall = (Date.now() - t0) / 1000;
  const traceText = trace ? (await bench.browser.stopTracing()).toString('utf8') : '';
  // BENCH_PAGE_TRACE_FILE keeps the whole trace, for chrome://tracing or a closer look.
  if (trace && process.env.BENCH_PAGE_TRACE_FILE) writeFileSync(process.env.BENCH_PAGE_TRACE_FILE, traceText);
  const traced = trace ? traceSummary(JSON.parse(traceText)) : [];
  const m1 = await metrics(cdp);
  const after = await pageInfo(page);
  const g1 = await gpu();
  const gd = (k: keyof GpuCounts) => g1[k] - g0[k];
  const hot = profile
    ? selfTimes(
        (
          (await cdp.send('Profiler.stop')) as {
            profile: { nodes: ProfileNode[]; samples: number[]; timeDeltas: number[] };
          }
        ).profile,
      )
    : [];

  const intervals = probe.raf.slice(1).map((t, k) => t - probe.raf[k]);
  const fpsOf = (ms: number) => 1000 / ms;
  const spanMs = probe.raf[probe.raf.length - 1] - probe.raf[0];
  const meanFps = ((probe.raf.length - 1) / spanMs) * 1000;
  const medianFps = fpsOf(median(intervals));
  // The 5th-percentile fps is the 95th-percentile frame interval.
  const p5Fps = fpsOf(quantile(intervals, 0.95));
  const lt = probe.longTasks;
  const ltTotal = lt.reduce((s, e) => s + e.duration, 0);
  const ltMax = lt.reduce((s, e) => Math.max(s, e.duration), 0);
  const received = after.framesReceived - before.framesReceived;
  const drawn = after.framesDrawn - before.framesDrawn;
  const days = after.lastDay - before.lastDay;
  const d = (name: string) => (m1[name] - m0[name]) * 1000; // CDP gives seconds
  const perDrawn = (ms: number) => (drawn > 0 ? ms / drawn : NaN);

  const rows: Array<[string, string]> = [
    [
      'grid',
      `${BENCH_NX} x ${BENCH_NY}, output every ${outputEveryDays} day(s), speed ${speed}, surface-current arrows on`,
    ],
    [
      'window width',
      `${width} CSS px, map canvas ${await page.evaluate(() => {
        const c = document.getElementById('map-gl') as HTMLCanvasElement;
        return `${c.width} x ${c.height}`;
      })} px`,
    ],
    ['chromium flags added', extraArgs.join(' ') || 'none'],
    [
      'measured',
      `${wall.toFixed(1)} s after ${warmup} s of warm-up; load average ${load.map((x) => x.toFixed(2)).join(' ')}`,
    ],
    ['fps mean', meanFps.toFixed(1)],
    ['fps median', medianFps.toFixed(1)],
    ['fps 5th percentile', p5Fps.toFixed(1)],
    ['rAF callbacks', String(probe.raf.length)],
    ['long tasks', `${lt.length}, total ${ltTotal.toFixed(0)} ms, longest ${ltMax.toFixed(0)} ms`],
    ['engine frames received / s', (received / wall).toFixed(1)],
    ['frames drawn / s', (drawn / wall).toFixed(1)],
    ['model days / s', (days / wall).toFixed(2)],
    ['main-thread script ms / s', (d('ScriptDuration') / wall).toFixed(0)],
    ['main-thread task ms / s', (d('TaskDuration') / wall).toFixed(0)],
    ['script ms per drawn frame', perDrawn(d('ScriptDuration')).toFixed(2)],
    ['task ms per drawn frame', perDrawn(d('TaskDuration')).toFixed(2)],
    ['layout + style ms per drawn frame', perDrawn(d('LayoutDuration') + d('RecalcStyleDuration')).toFixed(2)],
    [
      'field uploads / arrow uploads / WebGL draws / overlay draws',
      `${gd('fieldUploads')} / ${gd('arrowUploads')} / ${gd('glDraws')} / ${gd('overlayDraws')} for ${drawn} new frames drawn`,
    ],
    ['JS heap used (main thread)', `${(m1.JSHeapUsedSize / 1e6).toFixed(0)} MB`],
  ];
  const w = Math.max(...rows.map(([k]) => k.length));
  for (const [k, v] of rows) console.log(`${k.padEnd(w)}  ${v}`);
  if (after.status === 'finished') console.log('note: the run finished inside the measured window');
  if (profile) {
    const total = hot.reduce((s, h) => s + h.ms, 0);
    console.log(
      `\nmain-thread self time by function (CDP Profiler, ${total.toFixed(0)} ms sampled in ${wall.toFixed(1)} s):`,
    );
    for (const h of hot.slice(0, 15))
      console.log(`  ${h.ms.toFixed(0).padStart(6)} ms  ${((100 * h.ms) / total).toFixed(1).padStart(5)} %  ${h.name}`);
  }
  if (trace) {
    console.log(`\nrenderer main thread, trace events by total duration (inclusive, nested events counted in each):`);
    for (const t of traced.slice(0, 25))
      console.log(`  ${t.ms.toFixed(0).padStart(6)} ms  ${String(t.count).padStart(6)} x  ${t.name}`);
  }
  console.log(`page fps ${medianFps.toFixed(1)}`);
} finally {
  await bench.close();
}
