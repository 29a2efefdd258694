// Small time plots: a part's envelope over the run, and the total stress at a point, each with a
// marker at the model day on screen. The envelope values come from the model's own
// compileEnvelope (and drawBursts for random bursts), so the plot is what the run will use.

import { compileEnvelope, pulseFactor } from '../../model/forcing/envelopes.ts';
import { drawBursts } from '../../model/forcing/bursts.ts';
import type { WindPart } from '../../model/forcing/spec.ts';

/** Days 0..runDays in `n` steps (both ends included). */
export function dayAxis(runDays: number, n = 240): number[] {
  const out: number[] = [];
  for (let k = 0; k <= n; k++) out.push((runDays * k) / n);
  return out;
}

/**
 * A part's time factor at each day: the envelope for a fixed part; for random bursts, the sum of
 * the drawn bursts' pulses times their amplitudes (so the plot shows when bursts blow, and how
 * hard). Throws the model's message for an envelope that does not compile.
 */
export function partSeries(
  part: WindPart,
  days: number[],
  seed: string,
  index: number,
): { values: number[]; units: string } {
  // The answering wind follows the ocean, not the calendar: it has no time factor of its own.
  if (part.kind === 'answering') return { values: days.map(() => 0), units: 'follows the ocean' };
  if (part.kind === 'bursts') {
    const list = drawBursts(part, seed, index);
    return {
      values: days.map((d) => list.reduce((s, b) => s + b.amplitude * pulseFactor(d, b.start, b.duration, b.ramp), 0)),
      units: part.quantity === 'wind' ? 'm s-1' : 'N m-2',
    };
  }
  const env = compileEnvelope(part.envelope);
  return { values: days.map((d) => env.at(d)), units: 'factor' };
}

export interface PlotLine {
  values: ArrayLike<number>;
  colour: string;
  label: string;
}

/** A line plot with a zero line, axis labels and a vertical marker at `markDay` (if given). */
export function drawTimePlot(
  canvas: HTMLCanvasElement,
  days: number[],
  lines: PlotLine[],
  units: string,
  markDay: number | null,
): void {
  const ctx = canvas.getContext('2d');
  if (!ctx) return;
  const W = canvas.width;
  const H = canvas.height;
  ctx.clearRect(0, 0, W, H);
  ctx.fillStyle = '#fff';
  ctx.fillRect(0, 0, W, H);
  const L = 42;
  const R = 8;
  const T = 8;
  const B = 18;
  let lo = 0;
  let hi = 0;
  for (const l of lines)
    for (let k = 0; k < l.values.length; k++)
      if (Number.isFinite(l.values[k])) {
        lo = Math.min(lo, l.values[k]);
        hi = Math.max(hi, l.values[k]);
      }
  if (hi - lo < 1e-12) hi = lo + 1;
  const pad = 0.08 * (hi - lo);
  lo -= pad;
  hi += pad;
  const d0 = days[0];
  const d1 = days[days.length - 1] || 1;
  const px = (d: number) => L + ((d - d0) / (d1 - d0 || 1)) * (W - L - R);
  const py = (v: number) => T + ((hi - v) / (hi - lo)) * (H - T - B);
  ctx.strokeStyle = '#bbb';
  ctx.lineWidth = 1;
  ctx.strokeRect(L + 0.5, T + 0.5, W - L - R - 1, H - T - B - 1);
  ctx.beginPath();
  ctx.moveTo(L, Math.round(py(0)) + 0.5);
  ctx.lineTo(W - R, Math.round(py(0)) + 0.5);
  ctx.stroke();
  ctx.fillStyle = '#333';
  ctx.font = '10px system-ui, sans-serif';
  ctx.textAlign = 'right';
  ctx.textBaseline = 'middle';
  const fmt = (v: number) => (Math.abs(v) >= 100 ? v.toFixed(0) : Number(v.toPrecision(2)).toString());
  ctx.fillText(fmt(hi - pad), L - 3, py(hi - pad));
  ctx.fillText(fmt(lo + pad), L - 3, py(lo + pad));
  ctx.textAlign = 'center';
  ctx.textBaseline = 'top';
  ctx.fillText('day 0', px(d0) + 12, H - B + 3);
  ctx.fillText(`day ${Number(d1.toFixed(1))}`, px(d1) - 20, H - B + 3);
  ctx.textAlign = 'left';
  ctx.fillText(units, L + 4, T + 2);
  for (const l of lines) {
    ctx.strokeStyle = l.colour;
    ctx.lineWidth = 1.5;
    ctx.beginPath();
    let pen = false;
    for (let k = 0; k < days.length; k++) {
      const v = l.values[k];
      if (!Number.isFinite(v)) {
        pen = false;
        continue;
      }
      if (pen) ctx.lineTo(px(days[k]), py(v));
      else ctx.moveTo(px(days[k]), py(v));
      pen = true;
    }
    ctx.stroke();
  }
  if (markDay !== null && markDay >= d0 && markDay <= d1) {
    ctx.strokeStyle = '#c0392b';
    ctx.lineWidth = 1.5;
    ctx.setLineDash([3, 2]);
    ctx.beginPath();
    ctx.moveTo(Math.round(px(markDay)) + 0.5, T);
    ctx.lineTo(Math.round(px(markDay)) + 0.5, H - B);
    ctx.stroke();
    ctx.setLineDash([]);
  }
  canvas.dataset.markDay = markDay === null ? '' : String(markDay);
}
