// The colour bar under a map: the lookup table, round ticks of one precision that never overlap
// (model/display/ticks.ts chooses as many as fit at this width), the field's name and units, and
// the colour map's name.

import { exponentText, fittingTicks } from '../../model/display/ticks.ts';
import { colourAt } from '../render/colour-maps.ts';
import type { Range } from '../state/colour-range.ts';

export function formatValue(v: number): string {
  if (!Number.isFinite(v)) return '—';
  const a = Math.abs(v);
  if (a === 0) return '0';
  if (a >= 1e4 || a < 1e-3) return v.toExponential(2);
  if (a >= 100) return v.toFixed(0);
  if (a >= 10) return v.toFixed(1);
  if (a >= 1) return v.toFixed(2);
  return v.toPrecision(3).replace(/0+$/, '').replace(/\.$/, '');
}

export const BAR_FONT = '11px system-ui, sans-serif';

export function drawColourBar(
  canvas: HTMLCanvasElement,
  lut: Uint8Array,
  range: Range,
  label: string,
  units: string,
  mapTitle = '',
): void {
  const ctx = canvas.getContext('2d');
  if (!ctx) return;
  const W = canvas.width;
  const H = canvas.height;
  ctx.clearRect(0, 0, W, H);
  ctx.fillStyle = '#fff';
  ctx.fillRect(0, 0, W, H);
  const x0 = 10;
  const x1 = W - 10;
  const y0 = 16;
  const barH = 12;
  const img = ctx.createImageData(x1 - x0, barH);
  for (let x = 0; x < x1 - x0; x++) {
    const [r, g, b] = colourAt(lut, x / (x1 - x0 - 1));
    for (let y = 0; y < barH; y++) img.data.set([r, g, b, 255], (y * (x1 - x0) + x) * 4);
  }
  ctx.putImageData(img, x0, y0);
  ctx.strokeStyle = '#333';
  ctx.strokeRect(x0 + 0.5, y0 + 0.5, x1 - x0 - 1, barH - 1);
  ctx.fillStyle = '#222';
  ctx.font = BAR_FONT;
  ctx.textBaseline = 'top';
  const t = fittingTicks(range, x1 - x0, (s) => ctx.measureText(s).width);
  ctx.textAlign = 'left';
  ctx.fillText(`${label} (${exponentText(t.exponent) ? `${exponentText(t.exponent)} ` : ''}${units})`, x0, 2);
  if (mapTitle) {
    ctx.textAlign = 'right';
    ctx.fillStyle = '#666';
    ctx.fillText(mapTitle, x1, 2);
    ctx.fillStyle = '#222';
  }
  const span = range.max - range.min;
  const drawn: Array<{ label: string; left: number; right: number }> = [];
  ctx.textAlign = 'left';
  t.values.forEach((v, k) => {
    const x = x0 + (span > 0 ? ((v - range.min) / span) * (x1 - x0) : 0);
    ctx.beginPath();
    ctx.moveTo(x + 0.5, y0 + barH);
    ctx.lineTo(x + 0.5, y0 + barH + 3);
    ctx.stroke();
    const w = ctx.measureText(t.labels[k]).width;
    // Centred on the tick, kept inside the bar (as the tick chooser measured them).
    const left = Math.min(Math.max(x - w / 2, x0), x1 - w);
    ctx.fillText(t.labels[k], left, y0 + barH + 4);
    drawn.push({ label: t.labels[k], left: left - x0, right: left - x0 + w });
  });
  // What was written where, for the browser tests (labels must never overlap).
  canvas.dataset.ticks = JSON.stringify(drawn);
}
