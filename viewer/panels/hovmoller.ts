// The Hovmoller diagram: thermocline depth anomaly along one latitude, longitude across, model
// day upward, growing as the run goes. A click places the start of the Kelvin and long Rossby
// characteristic lines, so the user sees whether the signal keeps pace with c and c/3.

import { EARTH } from '../../model/config.ts';
import { LAND_GREY, LUT_SIZE, lookupTable } from '../render/colour-maps.ts';
import { drawAxes } from '../render/axes.ts';
import { graticuleLines, graticuleStep, lonLabel } from '../render/geo.ts';
import { characteristics } from '../state/characteristics.ts';
import { symmetricRange, THEORY_LINES } from '../../model/display/conventions.ts';
import { latLabel } from '../render/geo.ts';
import type { HovmollerStore } from '../state/hovmoller-store.ts';
import { formatValue } from './colour-bar.ts';

const M = { left: 44, right: 10, top: 20, bottom: 22 };

export interface HovExtent {
  lonWest: number;
  lonEast: number;
  days: number;
  nx: number;
}

export class HovmollerPanel {
  private extent: HovExtent | null = null;
  private latIndex = 0;
  start: { lon: number; day: number } | null = null;
  private c = 0;
  private earthRadius: number = EARTH.radius;
  private scale = 0;
  private image: ImageData | null = null;
  private markDay: number | null = null;
  private tmp: HTMLCanvasElement | null = null;

  constructor(
    readonly canvas: HTMLCanvasElement,
    private readonly store: HovmollerStore,
    private readonly onStart: (s: { lon: number; day: number }) => void,
  ) {
    canvas.addEventListener('click', (ev) => {
      const p = this.toData(
        ev.offsetX * (canvas.width / canvas.clientWidth),
        ev.offsetY * (canvas.height / canvas.clientHeight),
      );
      if (p) {
        this.start = p;
        this.onStart(p);
        this.draw();
      }
    });
  }

  setRun(extent: HovExtent, c: number, earthRadius: number, start: { lon: number; day: number } | null): void {
    this.extent = extent;
    this.c = c;
    this.earthRadius = earthRadius;
    this.start = start;
    this.scale = 0;
    this.image = null;
    this.latIndex = 0;
  }

  setLatitude(n: number): void {
    this.latIndex = n;
    this.scale = 0;
  }

  /** Day marked with a horizontal line (the frame on the map while scrubbing). */
  setMark(day: number | null): void {
    this.markDay = day;
  }

  get rows(): number {
    return this.store.at(this.latIndex).length;
  }

  private plot(): { x: number; y: number; w: number; h: number } {
    return { x: M.left, y: M.top, w: this.canvas.width - M.left - M.right, h: this.canvas.height - M.top - M.bottom };
  }

  private toData(px: number, py: number): { lon: number; day: number } | null {
    const e = this.extent;
    if (!e) return null;
    const p = this.plot();
    const fx = (px - p.x) / p.w;
    const fy = (p.y + p.h - py) / p.h;
    if (fx < 0 || fx > 1 || fy < 0 || fy > 1) return null;
    return { lon: e.lonWest + fx * (e.lonEast - e.lonWest), day: fy * e.days };
  }

  private toPixel(lon: number, day: number): [number, number] {
    const e = this.extent!;
    const p = this.plot();
    return [p.x + ((lon - e.lonWest) / (e.lonEast - e.lonWest)) * p.w, p.y + p.h - (day / e.days) * p.h];
  }

  draw(): void {
    const ctx = this.canvas.getContext('2d');
    const e = this.extent;
    if (!ctx) return;
    const W = this.canvas.width;
    const H = this.canvas.height;
    ctx.fillStyle = '#fff';
    ctx.fillRect(0, 0, W, H);
    this.canvas.dataset.rows = String(this.rows);
    if (!e) return;
    const p = this.plot();
    const rows = this.store.at(this.latIndex);
    const lut = lookupTable('anomaly');
    // The range every view uses (conventions.ts), and one that only widens while the run goes
    // (the diagram's early rows keep their colours).
    const m = rows.length ? symmetricRange(rows.map((r) => r.values)) : 0;
    if (m > this.scale) this.scale = m;
    const s = this.scale || 1;

    // One pixel per cell and output row, stretched to the plot without smoothing.
    const nRows = Math.max(1, rows.length);
    if (!this.image || this.image.width !== e.nx || this.image.height !== nRows)
      this.image = new ImageData(e.nx, nRows);
    const img = this.image;
    // The colours colourAt (render/colour-maps.ts) gives, written in place: this runs for every
    // cell of every row on each redraw while the run goes, so it allocates nothing.
    const data = img.data;
    const top = LUT_SIZE - 1;
    rows.forEach((r, n) => {
      let o = (nRows - 1 - n) * e.nx * 4;
      for (let i = 0; i < e.nx; i++, o += 4) {
        const v = r.values[i];
        if (!Number.isNaN(v)) {
          const l = Math.max(0, Math.min(top, Math.round((0.5 + 0.5 * (v / s)) * top))) * 4;
          data[o] = lut[l];
          data[o + 1] = lut[l + 1];
          data[o + 2] = lut[l + 2];
        } else {
          data[o] = LAND_GREY[0];
          data[o + 1] = LAND_GREY[1];
          data[o + 2] = LAND_GREY[2];
        }
        data[o + 3] = 255;
      }
    });
    if (rows.length) {
      this.tmp ??= document.createElement('canvas');
      const tmp = this.tmp;
      if (tmp.width !== img.width) tmp.width = img.width;
      if (tmp.height !== img.height) tmp.height = img.height;
      tmp.getContext('2d')!.putImageData(img, 0, 0);
      const firstDay = rows[0].day;
      const lastDay = rows[rows.length - 1].day;
      // Each row covers half an output interval either side of its day.
      const half = rows.length > 1 ? (lastDay - firstDay) / (rows.length - 1) / 2 : 0.5;
      const [, yTop] = this.toPixel(e.lonWest, Math.min(e.days, lastDay + half));
      const [, yBottom] = this.toPixel(e.lonWest, Math.max(0, firstDay - half));
      ctx.imageSmoothingEnabled = false;
      ctx.drawImage(tmp, p.x, yTop, p.w, yBottom - yTop);
    }

    // Axes: longitude below, days on the left.
    ctx.strokeStyle = 'rgba(0,0,0,0.25)';
    ctx.fillStyle = '#222';
    ctx.font = '11px system-ui, sans-serif';
    drawAxes(
      ctx,
      p,
      {
        values: graticuleLines(e.lonWest, e.lonEast, graticuleStep(e.lonEast - e.lonWest, Math.floor(p.w / 60))),
        at: (lon) => this.toPixel(lon, 0)[0],
        label: lonLabel,
      },
      {
        values: graticuleLines(0, e.days, graticuleStep(e.days, Math.floor(p.h / 30))),
        at: (d) => this.toPixel(e.lonWest, d)[1],
        label: (d) => `${d}`,
      },
      'rgba(0,0,0,0.25)',
    );
    ctx.save();
    ctx.translate(10, p.y + p.h / 2);
    ctx.rotate(-Math.PI / 2);
    ctx.textAlign = 'center';
    ctx.fillText('day', 0, 0);
    ctx.restore();
    ctx.textAlign = 'left';
    ctx.textBaseline = 'top';
    const lat = this.store.lats[this.latIndex];
    ctx.fillText(`h′ along ${lat === undefined ? '—' : latLabel(lat)}, colour ±${formatValue(s)} m`, p.x, 4);
    this.canvas.dataset.scale = String(s);

    if (this.markDay !== null) {
      const [, y] = this.toPixel(e.lonWest, this.markDay);
      ctx.strokeStyle = '#0b5cad';
      ctx.setLineDash([2, 3]);
      ctx.beginPath();
      ctx.moveTo(p.x, y);
      ctx.lineTo(p.x + p.w, y);
      ctx.stroke();
      ctx.setLineDash([]);
    }

    if (this.start && this.c > 0) {
      const lines = characteristics(this.start, this.c, this.earthRadius, {
        lonWest: e.lonWest,
        lonEast: e.lonEast,
        days: e.days,
      });
      ctx.save();
      ctx.beginPath();
      ctx.rect(p.x, p.y, p.w, p.h);
      ctx.clip();
      for (const l of lines) {
        const style = THEORY_LINES[l.name];
        ctx.strokeStyle = style.colour;
        ctx.lineWidth = style.width;
        ctx.setLineDash(style.dash);
        const [x0, y0] = this.toPixel(l.from[0], l.from[1]);
        const [x1, y1] = this.toPixel(l.to[0], l.to[1]);
        ctx.beginPath();
        ctx.moveTo(x0, y0);
        ctx.lineTo(x1, y1);
        ctx.stroke();
      }
      ctx.setLineDash([]);
      const [sx, sy] = this.toPixel(this.start.lon, this.start.day);
      ctx.fillStyle = '#fff';
      ctx.strokeStyle = '#000';
      ctx.beginPath();
      ctx.arc(sx, sy, 3.5, 0, 2 * Math.PI);
      ctx.fill();
      ctx.stroke();
      ctx.restore();
    }
  }
}
