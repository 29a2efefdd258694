// The numbers an answering wind part implies before any run: the atmosphere's scales (Gill 1980),
// the coupling interval and the SST's relaxation time. `pycno check` and the page show them.

import type { AnsweringPart, BulkSpec } from '../forcing/spec.ts';
import { makeBulkFormula } from '../forcing/bulk.ts';

const DAY = 86400;

export interface AnsweringNumbers {
  /** Index of the part in wind.parts. */
  part: number;
  strength: number;
  everySteps: number;
  /** The coupling interval everySteps x dt, days. */
  couplingDays: number;
  /** The atmosphere's equatorial radius sqrt(c_a / beta), km. */
  atmosphereRadiusKm: number;
  /** e-folding lengths of the Kelvin (c_a/eps, eastward) and first Rossby (c_a/(3 eps), westward) answers, km. */
  kelvinDecayKm: number;
  rossbyDecayKm: number;
  /** 1/(w + eps_T), the SST's relaxation time where S = 1, days. */
  sstRelaxationDays: number;
  /** The linear drag rho_air C_D |U_b| (N m-2 per m s-1), also the slope of the bulk law at the background wind along it. */
  dragPerWind: number;
  drag: AnsweringPart['drag'];
}

/** The first enabled answering part of a wind section, with its index, or null. */
export function answeringPartOf(
  parts: readonly { kind: string; enabled?: boolean }[],
): { part: AnsweringPart; index: number } | null {
  const index = parts.findIndex((p) => p.kind === 'answering' && p.enabled !== false);
  return index >= 0 ? { part: parts[index] as unknown as AnsweringPart, index } : null;
}

export function answeringNumbers(
  part: AnsweringPart,
  index: number,
  dt: number,
  beta: number,
  bulk: BulkSpec,
): AnsweringNumbers {
  const a = part.atmosphere;
  const eps = 1 / (a.dampingDays * DAY);
  const w = 1 / (part.sst.upwellingDays * DAY);
  const epsT = 1 / (part.sst.dampingDays * DAY);
  const b = part.background;
  return {
    part: index,
    strength: part.strength,
    everySteps: part.everySteps,
    couplingDays: (part.everySteps * dt) / DAY,
    atmosphereRadiusKm: Math.sqrt(a.speed / beta) / 1000,
    kelvinDecayKm: a.speed / eps / 1000,
    rossbyDecayKm: a.speed / (3 * eps) / 1000,
    sstRelaxationDays: 1 / (w + epsT) / DAY,
    dragPerWind: makeBulkFormula(bulk).factor(b.x, b.y),
    drag: part.drag,
  };
}
