// Designing on the map: a canvas of our own over the basin map that takes the pointer (and the
// keyboard) only while a tool is chosen, so with no tool the map's own clicks (probes) work as
// before. Tools: edit the selected Gaussian patch (drag its centre, its edge handles, its turning
// handle; drag on open water to draw a new extent from its centre), draw a latitude band, paint,
// and pick the point for the stress time series. The maths lives in patch-geometry.ts and paint.ts.

import type { WindPart } from '../../model/forcing/spec.ts';
import type { MapView } from '../render/map-view.ts';
import {
  bandFromDrag,
  bandOutline,
  dragEdge,
  hitHandle,
  insidePatch,
  moveCentre,
  patchHandles,
  patchOutline,
  scaleWidth,
  tidy,
  turnBy,
  turnTowards,
  type HandleKind,
  type PatchGeometry,
} from './patch-geometry.ts';
import { dab, strokePoints, type Brush } from './paint.ts';

export type ToolMode = 'off' | 'patch' | 'band' | 'paint' | 'point';

export interface ToolHost {
  /** The selected part (the live object: painting changes its grid in place). */
  part(): WindPart | null;
  /** Before a change: start an undo step. */
  begin(): void;
  /** The part was replaced (patch, band) or changed in place (paint). */
  changed(part: WindPart): void;
  brush(): Brush;
  point(): { lon: number; lat: number } | null;
  setPoint(lon: number, lat: number): void;
  /** A short message for the user (why a tool does nothing now). */
  say(text: string): void;
}

type Drag =
  | { kind: 'handle'; handle: HandleKind; lastLon: number; lastLat: number }
  | { kind: 'draw-patch'; lon: number; lat: number }
  | { kind: 'band'; lat: number }
  | { kind: 'paint'; lon: number; lat: number };

export class MapTools {
  readonly canvas: HTMLCanvasElement;
  mode: ToolMode = 'off';
  private drag: Drag | null = null;
  /** Keyboard cursor for painting and the point tool. */
  private cursor: { lon: number; lat: number } | null = null;

  constructor(
    stack: HTMLElement,
    private readonly map: MapView,
    private readonly host: ToolHost,
  ) {
    this.canvas = document.createElement('canvas');
    this.canvas.id = 'wind-tools';
    this.canvas.className = 'wd-tools';
    this.canvas.tabIndex = -1;
    this.canvas.setAttribute('aria-label', 'Wind design tools on the map');
    stack.append(this.canvas);
    this.canvas.addEventListener('pointerdown', (e) => this.down(e));
    this.canvas.addEventListener('pointermove', (e) => this.move(e));
    this.canvas.addEventListener('pointerup', (e) => this.up(e));
    this.canvas.addEventListener('pointercancel', (e) => this.up(e));
    this.canvas.addEventListener('keydown', (e) => this.key(e));
  }

  setMode(mode: ToolMode): void {
    this.mode = mode;
    this.drag = null;
    const on = mode !== 'off';
    this.canvas.classList.toggle('active', on);
    this.canvas.tabIndex = on ? 0 : -1;
    this.canvas.setAttribute('aria-label', KEY_HELP[mode]);
    this.draw();
  }

  // ---- coordinates ----
  private lonLat(x: number, y: number): { lon: number; lat: number } | null {
    const g = this.map.extent;
    if (!g) return null;
    const r = this.map.plotRect();
    return {
      lon: g.lonWest + ((x - r.left) / r.width) * (g.lonEast - g.lonWest),
      lat: g.latNorth - ((y - r.top) / r.height) * (g.latNorth - g.latSouth),
    };
  }

  private toPixel = (lon: number, lat: number): [number, number] => this.map.pixelOf(lon, lat);

  private patchOf(part: WindPart | null): PatchGeometry | null {
    if (part?.kind === 'fixed' && part.source.kind === 'shaped' && part.source.shape.kind === 'patch')
      return part.source.shape;
    // An answering part's upwelling region, when it is a patch, moves and sizes the same way.
    if (part?.kind === 'answering' && part.sst.region.kind === 'patch') return part.sst.region;
    return null;
  }

  private withPatch(part: WindPart, p: PatchGeometry): WindPart {
    if (part.kind === 'answering') {
      const next = structuredClone(part);
      next.sst.region = { ...(next.sst.region as object), ...p } as PatchGeometry & { kind: 'patch' };
      return next;
    }
    const next = structuredClone(part) as WindPart & { source: { shape: PatchGeometry } };
    next.source.shape = { ...(next.source.shape as object), ...p } as PatchGeometry;
    return next;
  }

  private withBand(part: WindPart, lat1: number, lat2: number): WindPart | null {
    if (part.kind !== 'fixed' || part.source.kind !== 'shaped' || part.source.shape.kind !== 'band') return null;
    const next = structuredClone(part) as typeof part;
    (next.source as { shape: { kind: 'band'; profile: ReturnType<typeof bandFromDrag> } }).shape.profile = bandFromDrag(
      part.source.shape.profile,
      lat1,
      lat2,
    );
    return next;
  }

  private paintGrid(part: WindPart | null) {
    return part?.kind === 'fixed' && part.source.kind === 'painted' ? part.source.grid : null;
  }

  // ---- pointer ----
  private down(e: PointerEvent): void {
    if (this.mode === 'off') return;
    const at = this.lonLat(e.offsetX, e.offsetY);
    if (!at) return;
    const part = this.host.part();
    this.canvas.focus();
    if (this.mode === 'point') {
      this.host.setPoint(at.lon, at.lat);
      this.draw();
      return;
    }
    if (this.mode === 'patch') {
      const p = this.patchOf(part);
      if (!p || !part) {
        this.host.say('Select a Gaussian patch part first (or add one), then drag it on the map.');
        return;
      }
      const h = hitHandle(p, e.offsetX, e.offsetY, this.toPixel) ?? (insidePatch(p, at.lon, at.lat) ? 'centre' : null);
      this.host.begin();
      if (h) this.drag = { kind: 'handle', handle: h, lastLon: at.lon, lastLat: at.lat };
      else {
        // Open water: the patch jumps there and the drag draws its extent.
        this.drag = { kind: 'draw-patch', lon: at.lon, lat: at.lat };
        this.host.changed(this.withPatch(part, { ...p, lon: tidy(at.lon), lat: tidy(at.lat) }));
      }
    } else if (this.mode === 'band') {
      if (!part || !this.withBand(part, at.lat, at.lat + 1)) {
        this.host.say('Select a latitude-profile part first (or add one), then drag across the latitudes of the band.');
        return;
      }
      this.host.begin();
      this.drag = { kind: 'band', lat: at.lat };
    } else if (this.mode === 'paint') {
      const g = this.paintGrid(part);
      if (!g || !part) {
        this.host.say('Select a painted part first (or add one), then paint on the map.');
        return;
      }
      this.host.begin();
      dab(g, at.lon, at.lat, this.host.brush());
      this.drag = { kind: 'paint', lon: at.lon, lat: at.lat };
      this.host.changed(part);
    }
    this.canvas.setPointerCapture(e.pointerId);
    e.preventDefault();
  }

  private move(e: PointerEvent): void {
    const d = this.drag;
    if (!d) return;
    const at = this.lonLat(e.offsetX, e.offsetY);
    const part = this.host.part();
    if (!at || !part) return;
    if (d.kind === 'handle') {
      const p = this.patchOf(part)!;
      let q: PatchGeometry;
      if (d.handle === 'centre') q = moveCentre(p, at.lon - d.lastLon, at.lat - d.lastLat);
      else if (d.handle === 'turn') q = turnTowards(p, at.lon, at.lat);
      else q = dragEdge(p, d.handle, at.lon, at.lat);
      d.lastLon = at.lon;
      d.lastLat = at.lat;
      this.host.changed(this.withPatch(part, q));
    } else if (d.kind === 'draw-patch') {
      const p = this.patchOf(part)!;
      const q = dragEdge(dragEdge({ ...p, tiltDeg: 0 }, 'east', at.lon, d.lat), 'north', d.lon, at.lat);
      const keepTilt = p.tiltDeg === undefined ? (({ tiltDeg: _t, ...rest }) => rest)(q) : q;
      this.host.changed(this.withPatch(part, keepTilt as PatchGeometry));
    } else if (d.kind === 'band') {
      const next = this.withBand(part, d.lat, at.lat);
      if (next) this.host.changed(next);
    } else if (d.kind === 'paint') {
      const g = this.paintGrid(part);
      if (!g) return;
      const brush = this.host.brush();
      for (const [lo, la] of strokePoints(d.lon, d.lat, at.lon, at.lat, brush.radius)) dab(g, lo, la, brush);
      d.lon = at.lon;
      d.lat = at.lat;
      this.host.changed(part);
    }
  }

  private up(e: PointerEvent): void {
    if (!this.drag) return;
    this.move(e);
    this.drag = null;
    if (this.canvas.hasPointerCapture(e.pointerId)) this.canvas.releasePointerCapture(e.pointerId);
  }

  // ---- keyboard: the same actions without a pointer ----
  private key(e: KeyboardEvent): void {
    const part = this.host.part();
    const g = this.map.extent;
    if (!g) return;
    const big = e.shiftKey;
    const arrows: Record<string, [number, number]> = {
      ArrowLeft: [-1, 0],
      ArrowRight: [1, 0],
      ArrowUp: [0, 1],
      ArrowDown: [0, -1],
    };
    const step = big ? 5 : 1;
    const arrow = arrows[e.key];
    let done = false;
    if (this.mode === 'patch') {
      const p = this.patchOf(part);
      if (!p || !part) return;
      let q: PatchGeometry | null = null;
      if (arrow) q = moveCentre(p, arrow[0] * step, arrow[1] * step);
      else if (e.key === '[') q = scaleWidth(p, 'lon', 1 / 1.1);
      else if (e.key === ']') q = scaleWidth(p, 'lon', 1.1);
      else if (e.key === '{') q = scaleWidth(p, 'lat', 1 / 1.1);
      else if (e.key === '}') q = scaleWidth(p, 'lat', 1.1);
      else if (e.key === ',' || e.key === '<') q = turnBy(p, big ? -15 : -5);
      else if (e.key === '.' || e.key === '>') q = turnBy(p, big ? 15 : 5);
      if (q) {
        this.host.begin();
        this.host.changed(this.withPatch(part, q));
        done = true;
      }
    } else if (this.mode === 'band') {
      if (part?.kind !== 'fixed' || part.source.kind !== 'shaped' || part.source.shape.kind !== 'band') return;
      const [s, n] = bandOutline(part.source.shape.profile);
      let next: WindPart | null = null;
      if (e.key === 'ArrowUp' || e.key === 'ArrowDown') {
        const dl = (e.key === 'ArrowUp' ? 1 : -1) * step;
        next = this.withBand(part, s + dl, n + dl);
      } else if (e.key === '[') next = this.withBand(part, s + 0.5, n - 0.5);
      else if (e.key === ']') next = this.withBand(part, s - 0.5, n + 0.5);
      if (next) {
        this.host.begin();
        this.host.changed(next);
        done = true;
      }
    } else if (this.mode === 'paint' || this.mode === 'point') {
      const c = this.cursor ??
        this.host.point() ?? { lon: (g.lonWest + g.lonEast) / 2, lat: (g.latSouth + g.latNorth) / 2 };
      if (arrow) {
        this.cursor = {
          lon: Math.min(g.lonEast, Math.max(g.lonWest, c.lon + arrow[0] * step)),
          lat: Math.min(g.latNorth, Math.max(g.latSouth, c.lat + arrow[1] * step)),
        };
        done = true;
      } else if (e.key === ' ' || e.key === 'Enter') {
        if (this.mode === 'point') this.host.setPoint(c.lon, c.lat);
        else {
          const grid = this.paintGrid(part);
          if (!grid || !part) {
            this.host.say('Select a painted part first (or add one), then paint on the map.');
            return;
          }
          this.host.begin();
          dab(grid, c.lon, c.lat, this.host.brush());
          this.host.changed(part);
        }
        this.cursor = c;
        done = true;
      }
    }
    if (done) {
      e.preventDefault();
      e.stopPropagation();
      this.draw();
    }
  }

  // ---- drawing the outlines and handles ----
  draw(): void {
    const gl = this.map.glCanvas;
    const c = this.canvas;
    if (c.width !== gl.width || c.height !== gl.height) {
      c.width = gl.width;
      c.height = gl.height;
    }
    c.style.width = gl.style.width;
    c.style.height = gl.style.height;
    const ctx = c.getContext('2d');
    if (!ctx) return;
    const dpr = gl.clientWidth ? gl.width / gl.clientWidth : 1;
    ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
    ctx.clearRect(0, 0, c.width, c.height);
    const g = this.map.extent;
    if (!g || this.mode === 'off') return;
    const part = this.host.part();
    ctx.lineWidth = 1.5;
    const p = this.patchOf(part);
    if (p && this.mode === 'patch') {
      ctx.strokeStyle = '#000';
      ctx.setLineDash([4, 3]);
      ctx.beginPath();
      patchOutline(p).forEach(([lo, la], k) => {
        const [x, y] = this.toPixel(lo, la);
        if (k === 0) ctx.moveTo(x, y);
        else ctx.lineTo(x, y);
      });
      ctx.stroke();
      ctx.setLineDash([]);
      for (const h of patchHandles(p)) {
        const [x, y] = this.toPixel(h.lon, h.lat);
        ctx.fillStyle = h.kind === 'turn' ? '#f5b700' : h.kind === 'centre' ? '#fff' : '#0b5cad';
        ctx.strokeStyle = '#000';
        ctx.beginPath();
        if (h.kind === 'turn') ctx.arc(x, y, 5, 0, 2 * Math.PI);
        else ctx.rect(x - 4, y - 4, 8, 8);
        ctx.fill();
        ctx.stroke();
      }
    }
    if (
      this.mode === 'band' &&
      part?.kind === 'fixed' &&
      part.source.kind === 'shaped' &&
      part.source.shape.kind === 'band'
    ) {
      ctx.strokeStyle = '#000';
      ctx.setLineDash([6, 3]);
      for (const lat of bandOutline(part.source.shape.profile)) {
        const [, y] = this.toPixel(g.lonWest, lat);
        const [x1] = this.toPixel(g.lonEast, lat);
        const [x0] = this.toPixel(g.lonWest, lat);
        ctx.beginPath();
        ctx.moveTo(x0, y);
        ctx.lineTo(x1, y);
        ctx.stroke();
      }
      ctx.setLineDash([]);
    }
    const cur = this.mode === 'point' ? (this.cursor ?? this.host.point()) : this.mode === 'paint' ? this.cursor : null;
    if (cur) {
      const [x, y] = this.toPixel(cur.lon, cur.lat);
      ctx.strokeStyle = '#000';
      ctx.beginPath();
      if (this.mode === 'paint') {
        const [xr] = this.toPixel(cur.lon + this.host.brush().radius, cur.lat);
        ctx.arc(x, y, Math.abs(xr - x), 0, 2 * Math.PI);
      } else {
        ctx.moveTo(x - 7, y);
        ctx.lineTo(x + 7, y);
        ctx.moveTo(x, y - 7);
        ctx.lineTo(x, y + 7);
      }
      ctx.stroke();
    }
  }
}

const KEY_HELP: Record<ToolMode, string> = {
  off: 'Wind design tools on the map (choose a tool first)',
  patch:
    'Patch tool: arrow keys move the patch (Shift: 5 degrees), [ and ] change the width along x, { and } along y, comma and period turn it',
  band: 'Band tool: up and down arrows move the band, [ narrows it, ] widens it',
  paint: 'Paint tool: arrow keys move the brush, Space paints a dab',
  point: 'Point tool: arrow keys move the point, Enter picks it for the time series',
};
