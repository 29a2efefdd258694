// Is a member of a batch done? Its run file must be a valid, complete Pycno run file (every
// record there, the last at the member's last day) of exactly the scenario the member asks for
// (the canonical hash of its resolved scenario). The array tasks skip such a member; --gather
// takes it in; anything else is run again (task) or reported (gather).

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { diffScenarios, showValue } from '../../model/compare/scenario-diff.ts';
import { RunFileError, type RunData } from '../../model/io/run-data.ts';
import { readRun } from '../../model/io/run-import.ts';
import { scenarioHash } from '../../model/scenario/canonical-hash.ts';
import { parseScenario } from '../../model/scenario/load-inputs.ts';
import { SCENARIO_FILE, type BatchMember } from './batch-folder.ts';

export type MemberCheck = { ok: true; run: RunData } | { ok: false; missing: boolean; reason: string };

/** The scenario JSON a member runs: the folder's scenario.json with the member's --set values. */
export function memberScenarioJson(dir: string, member: BatchMember): string {
  const text = readFileSync(join(dir, SCENARIO_FILE), 'utf8');
  return parseScenario(text, join(dir, SCENARIO_FILE), member.sets).scenarioJson;
}

export function checkMember(dir: string, member: BatchMember): MemberCheck {
  let bytes: Uint8Array;
  try {
    bytes = new Uint8Array(readFileSync(join(dir, member.file)));
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    return {
      ok: false,
      missing: code === 'ENOENT',
      reason: code === 'ENOENT' ? `no run file ${member.file}` : `cannot read ${member.file}: ${(e as Error).message}`,
    };
  }
  let run: RunData;
  try {
    run = readRun(bytes, member.file);
  } catch (e) {
    if (e instanceof RunFileError) return { ok: false, missing: false, reason: e.message };
    throw e;
  }
  const hash = scenarioHash(run.scenarioJson);
  if (hash !== member.scenarioHash) {
    let what = '';
    try {
      const diffs = diffScenarios(JSON.parse(memberScenarioJson(dir, member)), JSON.parse(run.scenarioJson));
      what = diffs.length
        ? `: ${diffs
            .slice(0, 4)
            .map((d) => `${d.path} is ${showValue(d.b)}, the member's is ${showValue(d.a)}`)
            .join('; ')}${diffs.length > 4 ? `; and ${diffs.length - 4} more` : ''}`
        : '';
    } catch {
      /* the folder's scenario.json cannot be read: the hash says enough */
    }
    return {
      ok: false,
      missing: false,
      reason: `${member.file} holds another scenario than member ${member.id} runs (canonical SHA-256 ${hash.slice(0, 12)}..., expected ${member.scenarioHash.slice(0, 12)}...)${what}`,
    };
  }
  const n = run.days.length;
  const last = run.days[n - 1];
  const wrongDay = member.lastDay !== null && Math.abs(last - member.lastDay) > 1e-6 * Math.max(1, member.lastDay);
  if ((member.records !== null && n !== member.records) || wrongDay) {
    return {
      ok: false,
      missing: false,
      reason: `${member.file} is incomplete: ${n} records to day ${last}, a complete run has ${member.records} to day ${member.lastDay}`,
    };
  }
  return { ok: true, run };
}
