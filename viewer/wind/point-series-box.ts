// The wind panel's "total stress at a point" box: taux and tauy at one cell over the whole run,
// from the model's own forcing, with a marker at the model day on screen.

import { placeLabel } from '../../model/display/coordinates.ts';
import type { BasinBox } from './design.ts';
import { $new, numberBox } from './dom.ts';
import { dayAxis, drawTimePlot } from './envelope-plot.ts';
import { previewSetup, stressSeriesAt } from './preview.ts';

type Json = Record<string, unknown>;

export interface LonLat {
  lon: number;
  lat: number;
}

export class PointSeriesBox {
  readonly el: HTMLFieldSetElement;
  point: LonLat | null = null;
  private series: { days: number[]; taux: Float64Array; tauy: Float64Array } | null = null;
  private modelDay: number | null = null;
  private readonly lonBox: HTMLInputElement;
  private readonly latBox: HTMLInputElement;
  private readonly plot: HTMLCanvasElement;
  private readonly msg: HTMLElement;

  constructor(
    private readonly design: {
      /** The scenario with the designed wind. */
      compose(): Json;
      runDays(): number;
      /** True when the composed scenario passed the validator. */
      valid(): boolean;
    },
  ) {
    const [plL, pLon] = numberBox('wd-point-lon', '', 'lon', '°E', 6);
    const [ptL, pLat] = numberBox('wd-point-lat', '0', 'lat', '°N', 5);
    this.lonBox = pLon;
    this.latBox = pLat;
    for (const b of [pLon, pLat]) {
      b.addEventListener('input', () => {
        const lon = Number(pLon.value);
        const lat = Number(pLat.value);
        this.point =
          pLon.value.trim() && pLat.value.trim() && Number.isFinite(lon) && Number.isFinite(lat) ? { lon, lat } : null;
        this.update();
      });
    }
    this.plot = $new('canvas', { id: 'wd-point-plot', width: 360, height: 110 });
    this.plot.setAttribute('aria-label', 'Total stress at the chosen point over the run');
    this.msg = $new('div', { className: 'hint', id: 'wd-point-msg' });
    this.el = $new(
      'fieldset',
      { className: 'wd-box' },
      $new('legend', { textContent: 'Total stress at a point over the run' }),
      $new(
        'div',
        { className: 'row small' },
        plL,
        ptL,
        $new('span', {
          className: 'hint',
          textContent: 'blue taux, orange tauy; the red dashes mark the model day on screen',
        }),
      ),
      this.plot,
      this.msg,
    );
  }

  /** The point picked on the map (rounded to 0.01°). */
  setPoint(lon: number, lat: number): void {
    this.point = { lon: Number(lon.toFixed(2)), lat: Number(lat.toFixed(2)) };
    this.showPoint();
    this.update();
  }

  /** A scenario was loaded: keep the point, or start at the basin's middle on the equator. */
  startIn(b: BasinBox): void {
    if (!this.point)
      this.point = {
        lon: Number(((b.lonWest + b.lonEast) / 2).toFixed(2)),
        lat: Math.min(b.latNorth, Math.max(b.latSouth, 0)),
      };
    this.showPoint();
  }

  private showPoint(): void {
    if (!this.point) return;
    this.lonBox.value = String(this.point.lon);
    this.latBox.value = String(this.point.lat);
  }

  /** Recompute the stress series at the point (after a change of design or point), then draw it. */
  update(valid = this.design.valid()): void {
    const msg = this.msg;
    this.series = null;
    if (!this.point || !valid) {
      msg.textContent = this.point
        ? 'fix the marked values to see the series'
        : 'type a longitude and latitude, or pick the point on the map';
      return;
    }
    try {
      const { resolved, grid } = previewSetup(this.design.compose());
      const days = dayAxis(this.design.runDays(), 160);
      const s = stressSeriesAt(resolved, grid, this.point.lon, this.point.lat, days);
      if (!s) {
        msg.textContent = `${placeLabel(this.point.lon, this.point.lat)} is land`;
        return;
      }
      this.series = { days, taux: s.taux, tauy: s.tauy };
      msg.textContent = `cell centre ${placeLabel(s.lon, s.lat)}`;
      this.drawMarker();
    } catch (e) {
      msg.textContent = (e as Error).message;
    }
  }

  /** The model day on screen moved. */
  setModelDay(day: number | null): void {
    this.modelDay = day;
    this.drawMarker();
  }

  /** Redraw the kept series with the marker at the model day (cheap: called for every frame). */
  private drawMarker(): void {
    const s = this.series;
    if (!s) return;
    drawTimePlot(
      this.plot,
      s.days,
      [
        { values: s.taux, colour: '#0b5cad', label: 'taux' },
        { values: s.tauy, colour: '#e67e22', label: 'tauy' },
      ],
      'N m-2',
      this.modelDay,
    );
  }
}
