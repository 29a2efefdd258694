// Live checking of a formula as it is typed: the model's own compiler (model/forcing/formula.ts),
// its message and character position, and the values it gives over the basin, so a user sees at
// once whether the shape is what they meant (a shape is a factor, about -1..1, that the part's
// x and y scale).

import { compileFormula, FormulaError, type CompiledFormula } from '../../model/forcing/formula.ts';

export type FormulaCheck =
  | { ok: true; usesTime: boolean; min: number; max: number; badAt: string | null }
  | { ok: false; message: string; index: number };

/** Compile and sample a formula on a coarse lattice of the basin at day `t`. */
export function checkFormula(
  text: string,
  basin: { lonWest: number; lonEast: number; latSouth: number; latNorth: number },
  t = 0,
): FormulaCheck {
  let f: CompiledFormula;
  try {
    f = compileFormula(text);
  } catch (e) {
    if (e instanceof FormulaError) return { ok: false, message: e.message, index: e.index };
    return { ok: false, message: (e as Error).message, index: -1 };
  }
  let min = Infinity;
  let max = -Infinity;
  let badAt: string | null = null;
  const n = 40;
  for (let j = 0; j <= n && !badAt; j++) {
    const lat = basin.latSouth + ((basin.latNorth - basin.latSouth) * j) / n;
    for (let i = 0; i <= n; i++) {
      const lon = basin.lonWest + ((basin.lonEast - basin.lonWest) * i) / n;
      const v = f.evaluate(lon, lat, t);
      if (!Number.isFinite(v)) {
        badAt = `gives ${v} at lon ${Number(lon.toFixed(2))}, lat ${Number(lat.toFixed(2))}, day ${t}`;
        break;
      }
      min = Math.min(min, v);
      max = Math.max(max, v);
    }
  }
  return { ok: true, usesTime: f.usesTime, min, max, badAt };
}

/** Two lines for a monospace box: the formula and a caret under character `index`. */
export function caretLines(text: string, index: number): [string, string] {
  // Tabs and newlines would shift the caret: show them as single spaces.
  const shown = text.replace(/[\t\n\r]/g, ' ');
  const at = Math.max(0, Math.min(index, shown.length));
  return [shown, `${' '.repeat(at)}^`];
}
