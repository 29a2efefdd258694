// The colour bar under the map: the lookup table with ticks, the field's name and units.

import { colourAt } from '../render/colour-maps.ts';
import { ticks, type Range } from '../state/colour-range.ts';

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

export function drawColourBar(canvas: HTMLCanvasElement, lut: Uint8Array, range: Range, label: string, units: string): void {
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
  ctx.font = '11px system-ui, sans-serif';
  ctx.textBaseline = 'top';
  ctx.textAlign = 'left';
  ctx.fillText(`${label} (${units})`, x0, 2);
  ctx.textAlign = 'center';
  for (const t of ticks(range, 6)) {
    const x = x0 + ((t - range.min) / (range.max - range.min)) * (x1 - x0);
    ctx.beginPath();
    ctx.moveTo(x + 0.5, y0 + barH);
    ctx.lineTo(x + 0.5, y0 + barH + 3);
    ctx.stroke();
    ctx.fillText(formatValue(t), Math.min(Math.max(x, x0 + 12), x1 - 12), y0 + barH + 4);
  }
}
