// What `pycno check` prints (the derived numbers of a scenario) and the summary after a run.

import type { Integrals } from '../../model/diagnostics/integrals.ts';
import type { DerivedNumbers } from '../../model/scenario/derived.ts';
import { formatBytes, formatDuration, formatRate } from './progress.ts';
import { coupledMode, coupledModeLine } from '../../model/coupling/mode-fit.ts';
import type { AnsweringNumbers } from '../../model/coupling/derived.ts';

const p3 = (x: number) => (Number.isFinite(x) ? x.toPrecision(3) : String(x));

function rows(list: Array<[string, string]>): string {
  const w = Math.max(...list.map(([k]) => k.length));
  return list.map(([k, v]) => `${k.padEnd(w)}  ${v}`).join('\n') + '\n';
}

export function checkReport(
  name: string,
  file: string,
  d: DerivedNumbers,
  fields: readonly string[],
  days: number,
  everyDays: number,
  notes: readonly string[],
): string {
  const s = d.stability;
  const dx = d.dxKm * 1000;
  const dy = d.dyKm * 1000;
  const cfl = d.c * d.dt * Math.sqrt(1 / (dx * dx) + 1 / (dy * dy));
  const list: Array<[string, string]> = [
    ['scenario', `${name} (${file})`],
    [
      'grid',
      `${d.nx} x ${d.ny} cells${d.oceanCells !== null ? `, ${d.oceanCells} ocean` : ''}; dx = ${d.dxKm.toFixed(1)} km, dy = ${d.dyKm.toFixed(1)} km`,
    ],
    ['Kelvin speed', `c = sqrt(g' H) = ${d.c.toFixed(3)} m/s`],
    ['equatorial radius', `L = sqrt(c / beta) = ${d.equatorialRadiusKm.toFixed(0)} km (beta = ${p3(d.beta)} m-1 s-1)`],
    [
      'Kelvin crossing',
      `${d.kelvinCrossingDays.toFixed(1)} days over ${d.crossingWidthKm.toFixed(0)} km of ocean along the equator`,
    ],
    [
      'long Rossby',
      `c/3 = ${d.rossbySpeed.toFixed(3)} m/s westward, crossing in ${d.rossbyCrossingDays.toFixed(1)} days`,
    ],
    [
      'time step',
      `dt = ${d.dt.toFixed(1)} s (${d.dtIsAuto ? 'auto' : 'given'}); limit ${s.dtMax.toFixed(1)} s, set by ${s.limitingTerm}`,
    ],
    ['limit', s.explanation],
    [
      'CFL',
      `gravity-wave Courant number c dt sqrt(1/dx^2 + 1/dy^2) = ${cfl.toFixed(3)}; dt / limit = ${(d.dt / s.dtMax).toFixed(3)}`,
    ],
    ['boundary layer', boundaryLayerLine(d)],
    ['steps', `${d.steps} for ${days} days`],
    [
      'output',
      `${d.outputs} records every ${everyDays} days${d.outputs > Math.floor(days / everyDays + 1e-9) + 1 ? ', the last at the end of the run (a shorter interval),' : ''} of ${fields.join(', ')}: about ${formatBytes(d.outputBytes)}`,
    ],
    ['memory', `about ${formatBytes(d.memoryBytes)}${d.precision === 'float32' ? ' (state and step in float32)' : ''}`],
  ];
  if (d.answering) list.push(...answeringLines(d.answering));
  for (const n of notes) list.push(['input', n]);
  if (d.boundaryLayer.advice) list.push(['warning', d.boundaryLayer.advice]);
  return rows(list);
}

/** What an answering wind part implies, before running (its measured mode comes with the run). */
export function answeringLines(a: AnsweringNumbers): Array<[string, string]> {
  const drag =
    a.drag === 'linear'
      ? `linear drag ${p3(a.dragPerWind)} N m-2 per m/s`
      : `bulk formula about the background wind (slope about ${p3(2 * a.dragPerWind)} N m-2 per m/s)`;
  return [
    [
      'answering wind',
      `wind.parts[${a.part}]: strength ${a.strength} m/s per K, coupled every ${a.everySteps} steps (${a.couplingDays.toPrecision(3)} days), ${drag}`,
    ],
    [
      'atmosphere',
      `L_a = sqrt(c_a / beta) = ${a.atmosphereRadiusKm.toFixed(0)} km; Kelvin answer decays east over c_a/eps = ${a.kelvinDecayKm.toFixed(0)} km, Rossby west over c_a/(3 eps) = ${a.rossbyDecayKm.toFixed(0)} km`,
    ],
    [
      'SST',
      `relaxes toward the subsurface temperature in 1/(w + eps_T) = ${a.sstRelaxationDays.toPrecision(3)} days where the region is 1`,
    ],
  ];
}

/** The western boundary layer's widths against dx, in one line. */
export function boundaryLayerLine(d: DerivedNumbers): string {
  const b = d.boundaryLayer;
  const km = (x: number) => `${x.toFixed(x < 10 ? 1 : 0)} km`;
  const share = Number.isFinite(b.intervals) ? `${b.intervals.toFixed(2)} dx` : 'no beta effect';
  return `western, Munk (A/beta)^(1/3) = ${km(b.munkKm)}, Stommel r/beta = ${km(b.stommelKm)}: ${share} (${b.resolved ? 'resolved' : 'UNRESOLVED'}; at least 1 dx wanted)`;
}

export interface RunSummary {
  wallSeconds: number;
  steps: number;
  cells: number;
  first: Integrals | null;
  last: Integrals;
  /** The record with the fastest flow, and the largest Courant number, over the whole run. */
  fastest?: Integrals | null;
  largestCourant?: number;
  records: number;
  outFile: string;
  restartFile?: string;
  /** A coupled run's index series at every record (model/coupling/indices.ts). */
  coupled?: { days: number[]; eastSst: number[]; warmWater: number[] };
}

/** What the sponge bands did to the layer volume (signed: negative = taken out), and entrainment beside it. */
function spongeLine(s: RunSummary): string {
  const v0 = s.first?.volume ?? NaN;
  const share = (x: number) => (Number.isFinite(x / v0) ? `${(100 * (x / v0)).toPrecision(3)} %` : '-');
  const sponge = s.last.spongeVolume;
  const entrained =
    s.last.entrainedVolume > 0
      ? `; entrainment ${p3(s.last.entrainedVolume)} m3 (${share(s.last.entrainedVolume)})`
      : '';
  return `${p3(sponge)} m3 (${share(sponge)} of the starting volume; negative = taken out)${entrained}`;
}

/** The fastest flow now and, when faster, the fastest of the run with its day. */
function fastestLine(s: RunSummary): string {
  const now = `${s.last.maxSpeed.toFixed(3)} m/s`;
  const f = s.fastest;
  return f && f.maxSpeed > s.last.maxSpeed
    ? `${now} (fastest of the run ${f.maxSpeed.toFixed(3)} m/s on day ${f.day.toFixed(1)})`
    : now;
}

export function runSummary(s: RunSummary): string {
  const rate = s.wallSeconds > 0 ? (s.steps * s.cells) / s.wallSeconds : Infinity;
  const drift = s.first ? (s.last.volume - s.first.volume) / s.first.volume : NaN;
  const list: Array<[string, string]> = [
    ['run time', `${formatDuration(s.wallSeconds)} for ${s.steps} steps on ${s.cells} cells`],
    ['speed', `${formatRate(rate)} cell updates/s`],
    ['final day', s.last.day.toFixed(2)],
    ['volume change', `${Number.isFinite(drift) ? drift.toExponential(2) : '-'} (relative, since the start)`],
    ['sponge volume', spongeLine(s)],
    ['energy', `${p3(s.last.energy)} J (kinetic ${p3(s.last.kinetic)}, potential ${p3(s.last.potential)})`],
    ['thinnest layer', `${s.last.minThickness.toFixed(2)} m`],
    ['fastest flow', fastestLine(s)],
    [
      'Courant number',
      s.largestCourant !== undefined && s.largestCourant > s.last.courant
        ? `${s.last.courant.toFixed(3)} (largest of the run ${s.largestCourant.toFixed(3)})`
        : s.last.courant.toFixed(3),
    ],
    ['output', `${s.outFile} (${s.records} records)`],
  ];
  if (s.coupled)
    list.push(['coupled mode', coupledModeLine(coupledMode(s.coupled.days, s.coupled.eastSst, s.coupled.warmWater))]);
  if (s.restartFile) list.push(['restart', s.restartFile]);
  return rows(list);
}
