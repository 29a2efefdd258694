// The scalar results of one ensemble member, from its run file: what a sweep summary tabulates
// per member. Wave measures are the run report's own (model/report/measure.ts): the Kelvin speed
// from the front on the equatorial Hovmoller row, the arrival day at each probe (when h' first
// reaches half its largest value there).

import { EARTH } from '../config.ts';
import type { RunData } from '../io/run-data.ts';
import { isMeasured, measureWaves, METRES_PER_DEGREE } from '../report/measure.ts';

export interface MemberResults {
  kelvinSpeed: number;
  kelvinSpeedError: number;
  /** c = sqrt(g' H) of the member. */
  kelvinSpeedTheory: number;
  /** Why the Kelvin speed was not measured, or null. */
  kelvinNote: string | null;
  /** Per probe, in the run's probe order: the arrival day (NaN: no signal) and the mean speed from the probe reached first. */
  arrivalDay: number[];
  arrivalSpeed: number[];
  /** The largest |ssh| over the ocean and the records, signed, with where and when. */
  sshPeak: number;
  sshPeakDay: number;
  sshPeakLon: number;
  sshPeakLat: number;
  energyEnd: number;
  energyPeak: number;
  /** (volume at the end - at the start) / at the start. */
  volumeChange: number;
  finalDay: number;
}

export function memberResults(run: RunData): MemberResults {
  const w = measureWaves(run);
  const kelvin = w.kelvin;
  const arrivalDay = w.arrivals.map((a) => (a.day === null ? NaN : a.day));
  // The speed of the signal from the probe it reached first: distance along the beta plane
  // (R times the angle, as the model measures it) over the time between the two arrivals.
  let first = -1;
  arrivalDay.forEach((d, k) => {
    if (Number.isFinite(d) && (first < 0 || d < arrivalDay[first])) first = k;
  });
  const arrivalSpeed = w.arrivals.map((a, k) => {
    if (first < 0 || k === first || !Number.isFinite(arrivalDay[k])) return NaN;
    const p = w.arrivals[first];
    const dist = Math.sqrt((a.lon - p.lon) * (a.lon - p.lon) + (a.lat - p.lat) * (a.lat - p.lat)) * METRES_PER_DEGREE;
    const dt = (arrivalDay[k] - arrivalDay[first]) * 86400;
    return dt > 0 ? dist / dt : NaN;
  });

  // Sea level: the ssh field where the run kept it, else (g'/g) h' as the model computes it.
  let peak = 0;
  let peakDay = NaN;
  let peakCell = -1;
  const factor = run.physics.reducedGravity / EARTH.gravity;
  for (const s of run.snapshots) {
    const ssh = s.fields.ssh;
    const h = s.fields.h_anom;
    const values = ssh ?? h;
    if (!values) continue;
    const k0 = ssh ? 1 : factor;
    for (let c = 0; c < values.length; c++) {
      const x = values[c] * k0;
      if (Number.isFinite(x) && Math.abs(x) > Math.abs(peak)) {
        peak = x;
        peakDay = s.day;
        peakCell = c;
      }
    }
  }
  const nx = run.grid.nx;
  const e = run.integrals.energy;
  const v = run.integrals.volume;
  let energyPeak = -Infinity;
  for (const x of e) if (x > energyPeak) energyPeak = x;
  return {
    kelvinSpeed: isMeasured(kelvin) ? kelvin.speed : NaN,
    kelvinSpeedError: isMeasured(kelvin) ? kelvin.standardError : NaN,
    kelvinSpeedTheory: w.c,
    kelvinNote: isMeasured(kelvin) ? null : kelvin.reason,
    arrivalDay,
    arrivalSpeed,
    sshPeak: peakCell >= 0 ? peak : NaN,
    sshPeakDay: peakDay,
    sshPeakLon: peakCell >= 0 ? run.grid.lon[peakCell % nx] : NaN,
    sshPeakLat: peakCell >= 0 ? run.grid.lat[Math.floor(peakCell / nx)] : NaN,
    energyEnd: e[e.length - 1],
    energyPeak: Number.isFinite(energyPeak) ? energyPeak : NaN,
    volumeChange: (v[v.length - 1] - v[0]) / v[0],
    finalDay: run.days[run.days.length - 1],
  };
}
