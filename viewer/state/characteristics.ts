// Lines of constant phase for the Hovmoller diagram: where a signal starting at (lon0, day0)
// would be if it travelled east at c (Kelvin) or west at c/3 (long Rossby). Only kinematics: the
// speeds come from the scenario's derived numbers.

import { longRossbySpeed } from '../../model/theory.ts';

export interface Characteristic {
  name: 'kelvin' | 'rossby';
  /** Zonal speed, degrees of longitude per day (east positive). */
  degPerDay: number;
  /** End points inside the diagram, [lon, day] each. */
  from: [number, number];
  to: [number, number];
}

/** m s-1 along the equator to degrees of longitude per day (distances are R times radians). */
export function degreesPerDay(speed: number, earthRadius: number): number {
  return (speed * 86400 * 180) / (Math.PI * earthRadius);
}

/**
 * The part of the line lon = lon0 + s (day - day0), day >= day0, that lies inside the
 * diagram's lon range and day range; null when none does.
 */
export function clipLine(
  lon0: number,
  day0: number,
  s: number,
  lonWest: number,
  lonEast: number,
  dayEnd: number,
): { from: [number, number]; to: [number, number] } | null {
  if (day0 > dayEnd || lon0 < lonWest || lon0 > lonEast) return null;
  let t1 = dayEnd;
  if (s > 0) t1 = Math.min(t1, day0 + (lonEast - lon0) / s);
  else if (s < 0) t1 = Math.min(t1, day0 + (lonWest - lon0) / s);
  return { from: [lon0, day0], to: [lon0 + s * (t1 - day0), t1] };
}

export function characteristics(
  start: { lon: number; day: number },
  c: number,
  earthRadius: number,
  extent: { lonWest: number; lonEast: number; days: number },
): Characteristic[] {
  const out: Characteristic[] = [];
  const kelvin = degreesPerDay(c, earthRadius);
  const lines: Array<[Characteristic['name'], number]> = [
    ['kelvin', kelvin],
    ['rossby', -longRossbySpeed(kelvin)],
  ];
  for (const [name, s] of lines) {
    const seg = clipLine(start.lon, start.day, s, extent.lonWest, extent.lonEast, extent.days);
    if (seg) out.push({ name, degPerDay: s, ...seg });
  }
  return out;
}

/** Where the characteristic lines start before the user picks a start: the first pulsed patch of wind, mid-pulse (the live page and saved runs). */
export function pulseStart(scenarioJson: string): { lon: number; day: number } | null {
  let sc: { wind?: { parts?: unknown[] } };
  try {
    sc = JSON.parse(scenarioJson);
  } catch {
    return null;
  }
  for (const p of (sc.wind?.parts ?? []) as Array<{
    source?: { shape?: { kind?: string; lon?: number } };
    envelope?: { kind?: string; start?: number; duration?: number };
  }>) {
    const shape = p.source?.shape;
    const env = p.envelope;
    if (
      shape?.kind === 'patch' &&
      typeof shape.lon === 'number' &&
      env?.kind === 'pulse' &&
      typeof env.start === 'number' &&
      typeof env.duration === 'number'
    ) {
      return { lon: shape.lon, day: env.start + env.duration / 2 };
    }
  }
  return null;
}
