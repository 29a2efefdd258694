// What pycno sweep checks before it launches anything, and what it says when it is stopped.
//
// - Every member's scenario is read with its own --set values (the --vary ones included) and
//   checked as pycno run would check it: paths, values, the caps on steps and output size. One
//   bad member refuses the whole sweep (exit 2) before a folder is made or a worker started,
//   naming each bad member and its first problem.
// - --out must be a folder (made when missing); an existing file there is one clear line.
// - Stopped with Ctrl-C, the sweep says which members finished (and where their files are),
//   which were stopped part way (their records kept in FILE.part-PID, as pycno run keeps them)
//   and which never started, and writes the index with each member's status.

import { statSync } from 'node:fs';
import { resolve as resolvePath } from 'node:path';
import { clipLine, MAX_ISSUE_LINES } from '../../model/scenario/errors.ts';
import { parseScenario } from '../../model/scenario/load-inputs.ts';
import type { RunAllowance } from '../../model/scenario/run-size.ts';
import { readScenarioText, ReadRefused } from '../files-node.ts';
import { TextEncodingError } from '../../model/io/text-decode.ts';

/** A member as the checks need it: its output file, its --vary values and its pycno run argv. */
export interface MemberPlan {
  file: string;
  values: Record<string, string>;
  argv: string[];
}

/** The --set values of a member's pycno run argument list. */
function setsOf(argv: readonly string[]): string[] {
  const out: string[] = [];
  for (let k = 0; k < argv.length; k++) if (argv[k] === '--set' && k + 1 < argv.length) out.push(argv[++k]);
  return out;
}

/**
 * The lines that refuse the sweep (empty when every member can run): the scenario file that
 * cannot be read, or each member that cannot run, with its --vary values and first problem.
 */
export function memberProblems(
  scenario: string,
  cwd: string,
  members: readonly MemberPlan[],
  allow: RunAllowance,
): string[] {
  let text: string;
  try {
    text = readScenarioText(scenario === '' ? '' : resolvePath(cwd, scenario));
  } catch (e) {
    if (!(e instanceof ReadRefused || e instanceof TextEncodingError)) throw e;
    return [
      `${scenario === '' ? "''" : scenario}: ${e instanceof ReadRefused ? 'cannot read the scenario file: ' : ''}${e.message}`,
    ];
  }
  const bad: string[] = [];
  let count = 0;
  for (const m of members) {
    try {
      parseScenario(text, scenario, setsOf(m.argv), { allow });
    } catch (e) {
      if (!(e instanceof Error) || e.name === 'TypeError' || e.name === 'RangeError') throw e;
      count++;
      if (bad.length < MAX_ISSUE_LINES) {
        const vary = Object.entries(m.values)
          .map(([p, v]) => `${p}=${v}`)
          .join(', ');
        bad.push(clipLine(`${m.file} (${vary}): ${e.message.split('\n')[0]}`));
      }
    }
  }
  if (count > bad.length) bad.push(`... and ${count - bad.length} more members that cannot run`);
  if (count > 0) bad.push(`${count} of ${members.length} members cannot run; nothing was started`);
  return bad;
}

/** Why --out cannot be the sweep's folder, or null (a missing folder is made). */
export function outFolderProblem(outDir: string, cwd: string): string | null {
  let st: ReturnType<typeof statSync>;
  try {
    st = statSync(resolvePath(cwd, outDir));
  } catch {
    return null;
  }
  if (st.isDirectory()) return null;
  return `--out ${outDir} is ${st.isFile() ? 'a file' : 'not a folder'}; pycno sweep writes its runs and index into a folder (it is made when missing): give a folder name`;
}

export interface MemberEnd {
  code: number;
  stdout: string;
  stderr: string;
}

/** A member's status for the index and the message after a Ctrl-C. */
export function memberStatus(end: MemberEnd | undefined): 'done' | 'failed' | 'stopped' | 'not started' {
  if (end === undefined) return 'not started';
  if (end.code === 0) return 'done';
  return end.code === 130 ? 'stopped' : 'failed';
}

/** What the sweep says after it was stopped with Ctrl-C: an index of the members by status. */
export function interruptedIndex(
  members: readonly MemberPlan[],
  ends: ReadonlyArray<MemberEnd | undefined>,
  indexFile: string | null,
): string[] {
  const by = (s: ReturnType<typeof memberStatus>) => members.filter((_, n) => memberStatus(ends[n]) === s);
  const done = by('done');
  const stopped = members.map((m, n) => ({ m, end: ends[n] })).filter(({ end }) => memberStatus(end) === 'stopped');
  const failed = by('failed');
  const waiting = by('not started');
  const list = (ms: readonly MemberPlan[]) => (ms.length ? `: ${ms.map((m) => m.file).join(', ')}` : '');
  const lines = [`interrupted with Ctrl-C: ${done.length} of ${members.length} members finished${list(done)}`];
  if (stopped.length) {
    // pycno run says where it kept the records of a stopped run: "... are in FILE.part-PID; ...".
    const where = stopped.map(({ m, end }) => /(?:is|are) in (\S+);/.exec(end!.stderr)?.[1] ?? `${m.file} (not kept)`);
    lines.push(`${stopped.length} stopped part way, their records kept in ${where.join(', ')}`);
  }
  if (failed.length) lines.push(`${failed.length} failed${list(failed)}`);
  if (waiting.length) lines.push(`${waiting.length} not started${list(waiting)}`);
  lines.push(indexFile ? `the index with each member's status is ${indexFile}` : 'the index could not be written');
  return lines;
}
