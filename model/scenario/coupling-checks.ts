// Checks of an answering wind part that the schema cannot express: one SST per run, coupled output
// fields only with a coupled wind, an equatorial basin for an equatorial atmosphere, a linear drag
// that has a background to work on, and a coupling interval short beside the SST's own time.

import { chooseTimeStep } from '../dynamics/stability.ts';
import { secondsOfDays } from '../clock.ts';
import { COUPLED_FIELDS } from '../diagnostics/fields.ts';
import type { PathSegment } from './errors.ts';
import { resolveScenario } from './resolve.ts';
import { scenarioStability } from './derived.ts';
import type { Scenario } from './types.ts';

const num = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);
const DAY = 86400;

/** The coupling interval may be at most this share of the SST's relaxation time 1/(w + eps_T). */
export const COUPLING_SHARE = 0.25;

export function couplingIssues(sc: Scenario, add: (path: PathSegment[], message: string) => void): void {
  const parts: any[] = Array.isArray(sc.wind?.parts) ? sc.wind.parts : [];
  const on = parts.map((p, i) => ({ p, i })).filter(({ p }) => p?.kind === 'answering' && p.enabled !== false);
  for (const { i } of on.slice(1)) {
    add(
      ['wind', 'parts', i],
      `a run has one SST anomaly, so at most one answering part can be on (wind.parts[${on[0].i}] is); switch one off with "enabled": false`,
    );
  }
  const fields: unknown[] = Array.isArray(sc.output?.fields) ? sc.output.fields : [];
  fields.forEach((f, k) => {
    if (on.length === 0 && (COUPLED_FIELDS as readonly unknown[]).includes(f)) {
      add(
        ['output', 'fields', k],
        `${String(f)} comes from an answering wind part, and this scenario has none switched on; leave it out of output.fields or switch the part on`,
      );
    }
  });
  if (on.length === 0) return;
  const { p, i } = on[0];
  const at = (...rest: PathSegment[]) => ['wind', 'parts', i, ...rest];
  const b: any = sc.basin ?? {};
  if (num(b.latSouth) && num(b.latNorth) && !(b.latSouth < 0 && b.latNorth > 0)) {
    add(
      at(),
      `the answering wind's atmosphere lives on the equatorial beta plane: the basin must reach across the equator (it spans ${b.latSouth}..${b.latNorth} N)`,
    );
  }
  const bg = p.background;
  if (p.drag === 'linear' && num(bg?.x) && num(bg?.y) && bg.x === 0 && bg.y === 0) {
    add(
      at('background'),
      'a linear drag about a background wind of 0 m/s gives no stress at all; give the background wind (trades are about x = -6) or use drag "bulk"',
    );
  }
  const sst = p.sst;
  if (
    !(
      num(p.everySteps) &&
      p.everySteps >= 1 &&
      num(sst?.upwellingDays) &&
      sst.upwellingDays > 0 &&
      num(sst?.dampingDays) &&
      sst.dampingDays > 0
    )
  )
    return;
  let dt: number | null = null;
  try {
    const r = resolveScenario(sc);
    const t = r.model.time;
    dt = t.dt ?? chooseTimeStep(scenarioStability(r), null, t.safety, secondsOfDays(sc.time.outputEveryDays));
  } catch {
    dt = null; // a section of the wrong type, already reported by the schema
  }
  if (dt === null || !(dt > 0) || !Number.isFinite(dt)) return;
  const relax = 1 / (1 / sst.upwellingDays + 1 / sst.dampingDays);
  const interval = (p.everySteps * dt) / DAY;
  if (interval > COUPLING_SHARE * relax) {
    const most = Math.max(1, Math.floor((COUPLING_SHARE * relax * DAY) / dt));
    add(
      at('everySteps'),
      `couples every ${interval.toPrecision(3)} days (${p.everySteps} steps of ${dt.toFixed(0)} s), more than a quarter of the SST's relaxation time 1/(w + eps_T) = ${relax.toPrecision(3)} days; use at most ${most}`,
    );
  }
}
