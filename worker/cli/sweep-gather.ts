// `pycno sweep --gather DIR [--out SUMMARY.nc] [--spread-fields f1,f2]`: every member of a batch
// folder checked (batch-member.ts: a complete run file of exactly the member's scenario, which is
// the folder's scenario but the varied values), the missing and failed ones listed with the
// commands that rerun them, and one summary file written (model/ensemble/summary-file.ts). The
// members are read one at a time, in one pass: the per-member results are a few numbers each,
// and the seed statistics are Welford accumulators, so memory does not grow with the members.
// Exit code: 0 all complete, 1 summary written but some member missing or failed, 2 bad input.

import { freemem } from 'node:os';
import { join, resolve as resolvePath } from 'node:path';
import { FIELD_NAMES, type FieldName } from '../../model/diagnostics/fields.ts';
import { memberResults } from '../../model/ensemble/member-results.ts';
import { EnsembleStatistics, StatisticsShapeError } from '../../model/ensemble/statistics.ts';
import { SEED_PATH, writeSummary, type SummaryMember } from '../../model/ensemble/summary-file.ts';
import type { RunData } from '../../model/io/run-data.ts';
import { scenarioHash } from '../../model/scenario/canonical-hash.ts';
import { readFileSync } from 'node:fs';
import {
  BatchRefused,
  BatchUsage,
  PLAN_FILE,
  printLines,
  readPlan,
  readStatus,
  SCENARIO_FILE,
  SCRIPT_FILE,
  shellQuote,
  SUMMARY_FILE,
  taskOf,
  type BatchPlan,
} from './batch-folder.ts';
import { checkMember } from './batch-member.ts';
import type { CliIO } from './io.ts';
import { OutputRefused, OutputWriteError, planOutput, writeWhole } from './output-file.ts';
import { formatBytes } from './progress.ts';
import { memberRerunCommand } from './sweep-task.ts';

interface GatherOptions {
  dir: string;
  out: string | null;
  fields: FieldName[] | null;
}

function parseGather(argv: readonly string[]): GatherOptions {
  const o: GatherOptions = { dir: '', out: null, fields: null };
  for (let k = 0; k < argv.length; k++) {
    let a = argv[k];
    let inline: string | undefined;
    if (a.startsWith('--') && a.includes('=')) {
      inline = a.slice(a.indexOf('=') + 1);
      a = a.slice(0, a.indexOf('='));
    }
    const value = () => {
      const v = inline ?? argv[++k];
      if (v === undefined || v === '') throw new BatchUsage(`${a} needs a value`);
      return v;
    };
    if (a === '--gather') o.dir = value();
    else if (a === '--out') o.out = value();
    else if (a === '--spread-fields') {
      const list = value()
        .split(',')
        .map((s) => s.trim())
        .filter(Boolean);
      const bad = list.filter((f) => !(FIELD_NAMES as readonly string[]).includes(f));
      if (bad.length || list.length === 0)
        throw new BatchUsage(
          `--spread-fields: ${bad.length ? `unknown field ${bad.join(', ')}` : 'no field given'}; the fields are ${FIELD_NAMES.join(', ')}`,
        );
      o.fields = list as FieldName[];
    } else throw new BatchUsage(`${a}: not an option of --gather (it takes --out FILE.nc and --spread-fields)`);
  }
  return o;
}

/** Groups of a seed ensemble: the distinct combinations of the varied values but the seed, in order. */
export function seedGroups(plan: BatchPlan): { groups: Array<Record<string, string>>; of: number[] } | null {
  if (!plan.vary.some((v) => v.path === SEED_PATH)) return null;
  const others = plan.vary.map((v) => v.path).filter((p) => p !== SEED_PATH);
  const groups: Array<Record<string, string>> = [];
  const keys = new Map<string, number>();
  const of = plan.members.map((m) => {
    const values = Object.fromEntries(others.map((p) => [p, m.values[p]]));
    const key = JSON.stringify(others.map((p) => m.values[p]));
    if (!keys.has(key)) {
      keys.set(key, groups.length);
      groups.push(values);
    }
    return keys.get(key)!;
  });
  return { groups, of };
}

/** For the tests: sees every member run as it is read (to check none is kept). */
export interface GatherHooks {
  onMember?: (run: RunData) => void;
}

export async function gather(argv: readonly string[], io: CliIO, hooks: GatherHooks = {}): Promise<number> {
  const o = parseGather(argv);
  const dir = resolvePath(io.cwd, o.dir);
  const plan = readPlan(dir, o.dir);
  // The folder's scenario must still be the one the plan was made from.
  let scenarioJson: string;
  try {
    scenarioJson = readFileSync(join(dir, SCENARIO_FILE), 'utf8');
  } catch (e) {
    throw new BatchUsage(`${join(o.dir, SCENARIO_FILE)}: cannot read it: ${(e as Error).message}`);
  }
  if (scenarioHash(scenarioJson) !== plan.scenarioHash) {
    throw new BatchUsage(
      `${join(o.dir, SCENARIO_FILE)} was changed after the batch was made (its canonical SHA-256 is not the one in ${PLAN_FILE}); the members' files cannot be checked against it`,
    );
  }
  const outShown = o.out ?? join(o.dir, SUMMARY_FILE);
  const outPath = o.out ? resolvePath(io.cwd, o.out) : join(dir, SUMMARY_FILE);
  const reads = [
    { path: join(dir, SCENARIO_FILE), what: `the batch scenario ${SCENARIO_FILE}` },
    { path: join(dir, PLAN_FILE), what: `the batch plan ${PLAN_FILE}` },
    ...plan.members.map((m) => ({ path: join(dir, m.file), what: `the run file of member ${m.id}` })),
  ];
  let outPlan: ReturnType<typeof planOutput>;
  try {
    outPlan = planOutput('--out', outPath, io.cwd, reads);
  } catch (e) {
    if (e instanceof OutputRefused) throw new BatchRefused(e.message.replace(outPath, outShown));
    throw e;
  }

  const seeds = seedGroups(plan);
  const stats = seeds ? new EnsembleStatistics(seeds.groups.length, o.fields) : null;
  const members: SummaryMember[] = [];
  let probes: Array<{ name: string; lon: number; lat: number }> = [];
  const notes: string[] = [];
  for (const m of plan.members) {
    // One member at a time, and a turn of the event loop between two: nothing of the last is held.
    await new Promise((r) => setImmediate(r));
    const group = seeds ? seeds.of[m.id - 1] : -1;
    const base: SummaryMember = {
      id: m.id,
      values: m.values,
      file: m.file,
      state: 'missing',
      exit: null,
      message: null,
      group,
      results: null,
    };
    const check = checkMember(dir, m);
    const status = readStatus(dir, m);
    if (check.ok) {
      const run = check.run;
      hooks.onMember?.(run);
      if (probes.length === 0 && run.probes.length > 0)
        probes = run.probes.map((p) => ({ name: p.name, lon: p.lon, lat: p.lat }));
      const results = memberResults(run);
      if (stats && seeds) {
        if (!stats.shape) {
          const nt = run.days.length;
          const nf = o.fields ? o.fields.filter((f) => run.fields.includes(f)).length : run.fields.length;
          const need = EnsembleStatistics.bytesFor(
            seeds.groups.length,
            nt,
            run.grid.nx * run.grid.ny,
            nf,
            run.hovmoller.length,
            run.grid.nx,
            run.probes.length,
          );
          const free = freemem();
          if (need > 0.8 * free) {
            throw new BatchUsage(
              `the seed statistics need about ${formatBytes(need)} of memory (${seeds.groups.length} seed ensemble${seeds.groups.length > 1 ? 's' : ''} x ${nt} records x ${nf} fields, two float64 numbers per value); ${formatBytes(free)} are free: take fewer fields with --spread-fields (e.g. --spread-fields h_anom)`,
            );
          }
        }
        try {
          stats.add(group, run);
        } catch (e) {
          if (!(e instanceof StatisticsShapeError)) throw e;
          notes.push(`member ${m.id} is left out of the statistics: ${e.message}`);
        }
      }
      members.push({ ...base, state: 'complete', exit: 0, results });
      continue;
    }
    if (status?.state === 'failed') {
      members.push({
        ...base,
        state: 'failed',
        exit: status.exit,
        message: status.message ?? 'failed (no message recorded)',
      });
    } else if (!check.missing) {
      members.push({ ...base, state: 'failed', exit: status?.exit ?? null, message: check.reason });
    } else if (status?.state === 'running') {
      members.push({
        ...base,
        message: `not finished: started on ${status.host} at ${status.started}${status.job ? ` (job ${status.job}, task ${status.task})` : ''}; still running, or stopped without a word (killed)`,
      });
    } else {
      members.push({
        ...base,
        message: status?.state === 'complete' ? `its status says complete but ${check.reason}` : 'never ran',
      });
    }
  }

  const title = plan.name;
  let bytes = 0;
  try {
    await writeWhole(outPlan, async (sink) => {
      bytes = await writeSummary(
        {
          title,
          scenarioJson,
          scenarioHash: plan.scenarioHash,
          vary: plan.vary,
          members,
          probes,
          groups: seeds?.groups ?? [],
          statistics: stats,
          command: ['pycno', 'sweep', ...argv].map(shellQuote).join(' '),
        },
        sink,
      );
    });
  } catch (e) {
    if (e instanceof OutputRefused || e instanceof OutputWriteError) {
      printLines(io, `${outShown}: cannot write the summary: ${e.message}`);
      return 1;
    }
    throw e;
  }

  const count = (s: string) => members.filter((m) => m.state === s).length;
  const lines = [
    `gathered      ${o.dir}: ${members.length} members: ${count('complete')} complete, ${count('failed')} failed, ${count('missing')} missing`,
  ];
  const bad = members.filter((m) => m.state !== 'complete');
  for (const m of bad) {
    const values = Object.entries(m.values)
      .map(([p, v]) => `${p}=${v}`)
      .join(' ');
    lines.push(
      `${m.state.padEnd(14)}member ${m.id} (${values})${m.exit !== null && m.state === 'failed' ? `, exit ${m.exit}` : ''}: ${(m.message ?? '').split('\n').join('; ')}`,
    );
    lines.push(`  rerun       ${memberRerunCommand(dir, plan, plan.members[m.id - 1])}`);
  }
  if (bad.length) {
    const tasks = [...new Set(bad.map((m) => taskOf(plan, plan.members[m.id - 1])))].sort((a, b) => a - b);
    lines.push(
      `resubmit      sbatch --array=${tasks.join(',')} ${shellQuote(join(dir, SCRIPT_FILE))}   (complete members are skipped)`,
    );
  }
  for (const n of notes) lines.push(`note          ${n}`);
  const st = stats?.shape
    ? `; mean and standard deviation over the seeds of ${stats.shape.fields.join(', ')} in ${seeds!.groups.length} seed ensemble${seeds!.groups.length > 1 ? 's' : ''}`
    : '';
  lines.push(`summary       ${outShown} (${formatBytes(bytes)}${st})`);
  io.stdout.write(lines.join('\n') + '\n');
  return bad.length ? 1 : 0;
}
