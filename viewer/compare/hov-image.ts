// A Hovmoller diagram of a comparison (A, B or B - A) on a 2-D canvas: longitude across, day
// upward, a symmetric colour range given by the caller so A and B can share one.

import { colourAt, lookupTable } from '../render/colour-maps.ts';
import { drawAxes } from '../render/axes.ts';
import { graticuleLines, graticuleStep, lonLabel } from '../render/geo.ts';
import { formatValue } from '../panels/colour-bar.ts';
import { THEORY_LINES } from '../../model/display/conventions.ts';
import { EARTH } from '../../model/config.ts';
import { characteristics } from '../state/characteristics.ts';

/** Where the Kelvin and long Rossby lines start on a run's diagram, and that run's c. */
export interface TheoryStart {
  lon: number;
  day: number;
  c: number;
}

const M = { left: 40, right: 8, top: 18, bottom: 20 };

/** RGBA pixels, one per longitude and time, latest time on the top row. */
export function hovPixels(
  values: ArrayLike<number>,
  nx: number,
  nt: number,
  scale: number,
): Uint8ClampedArray<ArrayBuffer> {
  const lut = lookupTable('anomaly');
  const px = new Uint8ClampedArray(nx * nt * 4);
  for (let n = 0; n < nt; n++) {
    const y = nt - 1 - n;
    for (let i = 0; i < nx; i++) {
      const v = values[n * nx + i];
      const [r, g, b] = colourAt(lut, Number.isNaN(v) ? NaN : 0.5 + 0.5 * (v / scale));
      px.set([r, g, b, 255], (y * nx + i) * 4);
    }
  }
  return px;
}

export function drawHovmoller(
  canvas: HTMLCanvasElement,
  lon: Float64Array,
  days: Float64Array,
  values: Float32Array,
  scale: number,
  title: string,
  theory: TheoryStart | null = null,
): void {
  const ctx = canvas.getContext('2d');
  if (!ctx) return;
  const W = canvas.width;
  const H = canvas.height;
  ctx.fillStyle = '#fff';
  ctx.fillRect(0, 0, W, H);
  const nx = lon.length;
  const nt = days.length;
  const p = { x: M.left, y: M.top, w: W - M.left - M.right, h: H - M.top - M.bottom };
  ctx.fillStyle = '#222';
  ctx.font = '11px system-ui, sans-serif';
  ctx.textBaseline = 'top';
  ctx.textAlign = 'left';
  ctx.fillText(`${title}, colour ±${formatValue(scale)} m`, p.x, 3);
  if (nx === 0 || nt === 0) return;
  const img = new ImageData(hovPixels(values, nx, nt, scale), nx, nt);
  const tmp = document.createElement('canvas');
  tmp.width = nx;
  tmp.height = nt;
  tmp.getContext('2d')!.putImageData(img, 0, 0);
  ctx.imageSmoothingEnabled = false;
  ctx.drawImage(tmp, p.x, p.y, p.w, p.h);
  const dLon = nx > 1 ? (lon[nx - 1] - lon[0]) / (nx - 1) : 1;
  const west = lon[0] - dLon / 2;
  const east = lon[nx - 1] + dLon / 2;
  const half = nt > 1 ? (days[nt - 1] - days[0]) / (nt - 1) / 2 : 0.5;
  const d0 = days[0] - half;
  const d1 = days[nt - 1] + half;
  drawAxes(
    ctx,
    p,
    {
      values: graticuleLines(west, east, graticuleStep(east - west, Math.floor(p.w / 60))),
      at: (l) => p.x + ((l - west) / (east - west)) * p.w,
      label: lonLabel,
    },
    {
      values: graticuleLines(d0, d1, graticuleStep(d1 - d0, Math.floor(p.h / 30))),
      at: (d) => p.y + p.h - ((d - d0) / (d1 - d0)) * p.h,
      label: (d) => `${d}`,
    },
    'rgba(0,0,0,0.25)',
  );
  // The theory lines as every view draws them: Kelvin solid, long Rossby dashed.
  if (theory && theory.c > 0) {
    const X = (l: number) => p.x + ((l - west) / (east - west)) * p.w;
    const Y = (d: number) => p.y + p.h - ((d - d0) / (d1 - d0)) * p.h;
    ctx.save();
    ctx.beginPath();
    ctx.rect(p.x, p.y, p.w, p.h);
    ctx.clip();
    for (const l of characteristics(theory, theory.c, EARTH.radius, { lonWest: west, lonEast: east, days: d1 })) {
      const style = THEORY_LINES[l.name];
      ctx.strokeStyle = style.colour;
      ctx.lineWidth = style.width;
      ctx.setLineDash(style.dash);
      ctx.beginPath();
      ctx.moveTo(X(l.from[0]), Y(l.from[1]));
      ctx.lineTo(X(l.to[0]), Y(l.to[1]));
      ctx.stroke();
    }
    ctx.restore();
  }
  canvas.dataset.scale = String(scale);
}
