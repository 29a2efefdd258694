// The "Coupled ocean and atmosphere" panel of a run with an answering wind, beside the map of the
// thermocline: the SST anomaly with the answering wind's arrows, the two indices the run is
// watched by (eastern SST, warm-water volume) against time, and the coupled mode measured from
// them as the run goes (model/coupling/mode-fit.ts, the same fit as `pycno run` and `pycno report`).
// The numbers come from the engine's samples; the page only lays them out.

import type { FieldName } from '../../model/diagnostics/fields.ts';
import { coupledMode, coupledModeLine } from '../../model/coupling/mode-fit.ts';
import type { CoupledIndices } from '../../model/forcing/stress.ts';
import { colourAt, lookupTable } from '../render/colour-maps.ts';
import { formatValue } from './colour-bar.ts';

interface PanelGrid {
  nx: number;
  ny: number;
  ocean: Uint8Array;
}

export class CoupledPanel {
  private grid: PanelGrid | null = null;
  private on = false;
  private days: number[] = [];
  private east: number[] = [];
  private warm: number[] = [];
  private readonly map: HTMLCanvasElement;
  private readonly plot: HTMLCanvasElement;
  private readonly text: HTMLElement;
  private readonly scale: HTMLElement;

  constructor(private readonly root: HTMLElement) {
    this.map = Object.assign(document.createElement('canvas'), { id: 'coupled-map', width: 230, height: 90 });
    this.map.setAttribute('aria-label', 'Sea-surface temperature anomaly with the answering wind');
    this.scale = Object.assign(document.createElement('div'), { className: 'hint', id: 'coupled-scale' });
    this.plot = Object.assign(document.createElement('canvas'), { id: 'coupled-plot', width: 230, height: 110 });
    this.plot.setAttribute('aria-label', 'Eastern SST anomaly and warm-water volume against time');
    this.text = Object.assign(document.createElement('p'), { className: 'hint', id: 'coupled-mode', role: 'status' });
    const legend = Object.assign(document.createElement('p'), {
      className: 'legend',
      textContent:
        'red: eastern SST anomaly (K, over the upwelling region); blue: warm-water volume (mean h\u2032 5S\u20135N, m); each on its own scale',
    });
    root.append(this.map, this.scale, this.plot, legend, this.text);
    root.hidden = true;
  }

  /** A new run: shown only when it has an answering wind and writes the SST anomaly. */
  setRun(grid: PanelGrid, fields: readonly FieldName[], coupled: boolean): void {
    this.grid = grid;
    this.on = coupled && fields.includes('sst_anom');
    this.root.hidden = !this.on;
    this.days = [];
    this.east = [];
    this.warm = [];
    this.map.height = Math.max(40, Math.round((230 * grid.ny) / grid.nx));
    this.render();
  }

  addSamples(samples: ReadonlyArray<{ day: number; coupled?: CoupledIndices }>): void {
    if (!this.on) return;
    for (const s of samples) {
      if (!s.coupled) continue;
      this.days.push(s.day);
      this.east.push(s.coupled.eastSst);
      this.warm.push(s.coupled.warmWater);
    }
    this.render();
  }

  /** The SST anomaly of the frame on screen, with the answering wind (when the run writes it). */
  drawFields(fields: Partial<Record<FieldName, Float32Array>>): void {
    const g = this.grid;
    const sst = fields.sst_anom;
    if (!this.on || !g || !sst) return;
    const ctx = this.map.getContext('2d');
    if (!ctx) return;
    let m = 0;
    for (let k = 0; k < sst.length; k++) if (Number.isFinite(sst[k])) m = Math.max(m, Math.abs(sst[k]));
    const range = m > 0 ? m : 1e-6;
    const lut = lookupTable('anomaly');
    const img = ctx.createImageData(g.nx, g.ny);
    for (let j = 0; j < g.ny; j++) {
      for (let i = 0; i < g.nx; i++) {
        const v = sst[j * g.nx + i];
        const [r, gr, b] = colourAt(lut, g.ocean[j * g.nx + i] ? 0.5 + v / (2 * range) : NaN);
        const o = 4 * ((g.ny - 1 - j) * g.nx + i);
        img.data.set([r, gr, b, 255], o);
      }
    }
    // Drawn at the grid's own size, then scaled onto the canvas.
    const tmp = document.createElement('canvas');
    tmp.width = g.nx;
    tmp.height = g.ny;
    tmp.getContext('2d')?.putImageData(img, 0, 0);
    ctx.imageSmoothingEnabled = false;
    ctx.drawImage(tmp, 0, 0, this.map.width, this.map.height);
    const u = fields.u_atm;
    const v = fields.v_atm;
    let wind = 0;
    if (u && v) {
      for (let k = 0; k < u.length; k++) if (Number.isFinite(u[k])) wind = Math.max(wind, Math.hypot(u[k], v[k]));
      const step = Math.max(2, Math.round(g.nx / 16));
      const sx = this.map.width / g.nx;
      const sy = this.map.height / g.ny;
      const len = (1.6 * step * sx) / (wind || 1);
      ctx.strokeStyle = '#111';
      ctx.lineWidth = 1;
      ctx.beginPath();
      for (let j = Math.floor(step / 2); j < g.ny; j += step) {
        for (let i = Math.floor(step / 2); i < g.nx; i += step) {
          const k = j * g.nx + i;
          if (!Number.isFinite(u[k]) || wind === 0) continue;
          const x = (i + 0.5) * sx;
          const y = (g.ny - j - 0.5) * sy;
          ctx.moveTo(x, y);
          ctx.lineTo(x + u[k] * len, y - v[k] * len);
          ctx.rect(x + u[k] * len - 1, y - v[k] * len - 1, 2, 2);
        }
      }
      ctx.stroke();
    }
    this.scale.textContent = `SST anomaly, \u00b1${formatValue(range)} K (blue cool, red warm)${u && v ? `; answering wind up to ${formatValue(wind)} m/s` : ''}`;
  }

  /** The measured mode in a few words, for the derived numbers. */
  shortMode(): string {
    const mode = this.days.length >= 4 ? coupledMode(this.days, this.east, this.warm) : null;
    if (!mode) return this.days.length ? 'measured once three half cycles have passed' : 'measured as the run goes';
    const f = mode.fit;
    return `${formatValue(f.periodDays / 365.25)} years, ${f.growthPerYear >= 0 ? '+' : '\u2212'}${formatValue(Math.abs(f.growthPerYear))} per year (to day ${formatValue(f.toDay)})`;
  }

  private render(): void {
    if (!this.on) return;
    const ctx = this.plot.getContext('2d');
    if (ctx) {
      const W = this.plot.width;
      const H = this.plot.height;
      ctx.fillStyle = '#fff';
      ctx.fillRect(0, 0, W, H);
      ctx.strokeStyle = '#bbb';
      ctx.beginPath();
      ctx.moveTo(0, H / 2 + 0.5);
      ctx.lineTo(W, H / 2 + 0.5);
      ctx.stroke();
      const n = this.days.length;
      if (n > 1) {
        const d0 = this.days[0];
        const d1 = this.days[n - 1];
        const line = (values: number[], colour: string) => {
          let s = 0;
          for (const x of values) if (Number.isFinite(x)) s = Math.max(s, Math.abs(x));
          if (!(s > 0)) return;
          ctx.strokeStyle = colour;
          ctx.lineWidth = 1.4;
          ctx.beginPath();
          values.forEach((x, k) => {
            const px = ((this.days[k] - d0) / (d1 - d0 || 1)) * (W - 4) + 2;
            const py = H / 2 - (x / s) * (H / 2 - 4);
            if (k === 0) ctx.moveTo(px, py);
            else ctx.lineTo(px, py);
          });
          ctx.stroke();
        };
        line(this.east, '#b2182b');
        line(this.warm, '#2166ac');
      }
    }
    const mode = this.days.length >= 4 ? coupledMode(this.days, this.east, this.warm) : null;
    const last = this.days.length - 1;
    const now =
      last >= 0
        ? `Day ${this.days[last].toFixed(0)}: eastern SST ${formatValue(this.east[last])} K, warm water ${formatValue(this.warm[last])} m. `
        : '';
    this.text.textContent = `${now}Coupled mode: ${mode ? coupledModeLine(mode) : 'measured once the run has three complete half cycles of the eastern SST'}.`;
  }
}
