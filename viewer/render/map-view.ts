// The map panel: the WebGL canvas with an overlay canvas on top for the graticule, labels, probe
// marks, the cursor and the reference arrows. Both canvases have the same size, so the PNG
// export is the two stacked. A draw sends to the GPU only what changed since the last one (the
// field when its source changed, each arrow layer when its vectors did), draws the WebGL canvas
// only when something on it changed (without a GPU compositor Chromium reads every changed
// WebGL canvas back on the main thread), and repaints the overlay only when it changed.

import { drawAxes } from './axes.ts';
import { MapRenderer, type ArrowSet, type Viewport } from './map-gl.ts';
import { arrowCells, cellAt, graticuleLines, graticuleStep, latLabel, lonLabel, type Extent } from './geo.ts';
import { roundUp } from '../../model/display/conventions.ts';
import type { GridInfo } from '../../worker/protocol.ts';

const MARGIN = { left: 46, right: 10, top: 10, bottom: 24 };
/** CSS pixels between arrows, unless the page sets another spacing (its density control). */
export const ARROW_SPACING = 22;
/** The percentile of the arrows' lengths that the automatic key arrow stands for. */
export const KEY_PERCENTILE = 0.95;
/** The key arrow's length in arrow spacings. */
const KEY_LENGTH = 1.2;

/**
 * The automatic key of an arrow layer: the 95th percentile of the arrows' lengths, rounded up
 * to 1, 2, 2.5 or 5 times a power of ten. A high percentile rather than the largest arrow, so one
 * fast jet does not shrink every other arrow to a dot.
 */
export function keyMagnitude(lengths: Float32Array): number {
  if (lengths.length === 0) return 0;
  const sorted = Float32Array.from(lengths).sort();
  return roundUp(sorted[Math.min(sorted.length - 1, Math.floor(KEY_PERCENTILE * sorted.length))]);
}

export interface VectorLayer {
  name: string;
  u: Float32Array;
  v: Float32Array;
  units: string;
  colour: [number, number, number];
  /** The magnitude the key arrow stands for, set by the user; absent: chosen from the data. */
  reference?: number;
}

/**
 * Where a field came from: a draw with the same frame object and field name as the last one has
 * the same values, so nothing is uploaded. Without it every draw uploads.
 */
export interface FieldSource {
  frame: object;
  field: string;
}

/** What arrow slot n holds on the GPU. */
interface ArrowSlot {
  u: Float32Array | null;
  v: Float32Array | null;
  stride: number;
  reference: number | undefined;
  at: Float32Array;
  vec: Float32Array;
  set: ArrowSet | null;
}

const sameColour = (a: readonly number[], b: readonly number[]) => a[0] === b[0] && a[1] === b[1] && a[2] === b[2];

export interface Mark {
  name: string;
  lon: number;
  lat: number;
}

export class MapView {
  readonly gl: MapRenderer;
  private grid: GridInfo | null = null;
  private cssW = 0;
  private cssH = 0;
  private dpr = 1;
  /** Steady reference magnitudes per layer name (widen at once, shrink slowly). */
  private refs = new Map<string, number>();
  private lastArrows: Array<{ layer: VectorLayer; ref: number; pxPerRef: number }> = [];
  /** The longest arrow of each layer at its last upload. */
  private longest = new Map<string, number>();
  private lastSource: FieldSource | null = null;
  private uploadedRange: [number, number] | null = null;
  private shaderRange: [number, number] = [0, 1];
  private slots: ArrowSlot[] = [0, 1].map(() => ({
    u: null,
    v: null,
    stride: 0,
    reference: undefined,
    at: new Float32Array(0),
    vec: new Float32Array(0),
    set: null,
  }));
  private cells: { nx: number; ny: number; stride: number; list: number[] } | null = null;
  /** Set when the canvas, grid or GPU data changed: the WebGL canvas must be drawn again. */
  private glDirty = true;
  private glKey = '';
  private overlayKey = '';
  /** CSS pixels between arrows (the page's density control); the key arrow is one spacing long. */
  arrowSpacing = ARROW_SPACING;
  private lengths = new Float32Array(0);
  /** GPU uploads and WebGL draws so far, for the benchmarks and tests. */
  readonly counts = { fieldUploads: 0, arrowUploads: 0, glDraws: 0, overlayDraws: 0 };

  constructor(
    readonly glCanvas: HTMLCanvasElement,
    readonly overlay: HTMLCanvasElement,
    options: { forceBytes?: boolean } = {},
  ) {
    this.gl = new MapRenderer(glCanvas, options);
  }

  setGrid(grid: GridInfo): void {
    this.grid = grid;
    this.refs.clear();
    this.gl.setGrid(grid.nx, grid.ny, grid.ocean);
    this.invalidate();
  }

  /** Forget what is on the GPU and on screen: the next draw uploads and draws everything. */
  invalidate(): void {
    this.lastSource = null;
    this.uploadedRange = null;
    for (const s of this.slots) {
      s.u = null;
      s.v = null;
    }
    this.glDirty = true;
    this.overlayKey = '';
  }

  get extent(): Extent | null {
    return this.grid;
  }

  /** Size the canvases to a width in CSS pixels; the height follows the basin's shape. */
  layout(cssWidth: number, maxHeight: number): void {
    if (!this.grid) return;
    const g = this.grid;
    const plotW = Math.max(100, cssWidth - MARGIN.left - MARGIN.right);
    const aspect = (g.latNorth - g.latSouth) / (g.lonEast - g.lonWest);
    const plotH = Math.max(60, Math.min(maxHeight - MARGIN.top - MARGIN.bottom, plotW * aspect));
    this.cssW = Math.round(plotW + MARGIN.left + MARGIN.right);
    this.cssH = Math.round(plotH + MARGIN.top + MARGIN.bottom);
    this.dpr = Math.min(2, window.devicePixelRatio || 1);
    for (const c of [this.glCanvas, this.overlay]) {
      c.style.width = `${this.cssW}px`;
      c.style.height = `${this.cssH}px`;
      c.width = Math.round(this.cssW * this.dpr);
      c.height = Math.round(this.cssH * this.dpr);
    }
    // Where the plot sits, for anyone reading the picture back (the browser tests).
    const r = this.plotRect();
    this.glCanvas.dataset.plot = [r.left, r.top, r.width, r.height].join(',');
    // Resizing a canvas clears it; arrow spacing follows the plot width.
    this.invalidate();
  }

  /** Plot area in CSS pixels from the top-left. */
  plotRect(): { left: number; top: number; width: number; height: number } {
    return {
      left: MARGIN.left,
      top: MARGIN.top,
      width: this.cssW - MARGIN.left - MARGIN.right,
      height: this.cssH - MARGIN.top - MARGIN.bottom,
    };
  }

  private viewport(): Viewport {
    const r = this.plotRect();
    const d = this.dpr;
    return {
      x: Math.round(r.left * d),
      y: Math.round(MARGIN.bottom * d),
      width: Math.round(r.width * d),
      height: Math.round(r.height * d),
    };
  }

  /** Cell under a point in CSS pixels relative to the canvas. */
  cellAtPixel(x: number, y: number): { i: number; j: number } | null {
    if (!this.grid) return null;
    const r = this.plotRect();
    return cellAt((x - r.left) / r.width, (y - r.top) / r.height, this.grid.nx, this.grid.ny);
  }

  /** Pixel (CSS, canvas-relative) of a lon/lat. */
  pixelOf(lon: number, lat: number): [number, number] {
    const g = this.grid!;
    const r = this.plotRect();
    return [
      r.left + ((lon - g.lonWest) / (g.lonEast - g.lonWest)) * r.width,
      r.top + ((g.latNorth - lat) / (g.latNorth - g.latSouth)) * r.height,
    ];
  }

  draw(
    values: Float32Array,
    range: { min: number; max: number },
    layers: VectorLayer[],
    marks: Mark[],
    cursor: { i: number; j: number } | null,
    source?: FieldSource,
  ): void {
    if (!this.grid) return;
    const last = this.lastSource;
    const sameField =
      source !== undefined && last !== null && source.frame === last.frame && source.field === last.field;
    // The byte fallback bakes the range into the texels; float textures take it as a uniform.
    const sameTexels =
      sameField &&
      (this.gl.floatTextures ||
        (this.uploadedRange !== null && this.uploadedRange[0] === range.min && this.uploadedRange[1] === range.max));
    if (!sameTexels) {
      this.shaderRange = this.gl.setField(values, range);
      this.uploadedRange = [range.min, range.max];
      this.counts.fieldUploads++;
      this.glDirty = true;
    } else if (this.gl.floatTextures) this.shaderRange = [range.min, range.max];
    this.lastSource = source ?? null;

    const arrows: ArrowSet[] = [];
    const drawn: Array<{ layer: VectorLayer; ref: number; pxPerRef: number }> = [];
    for (let n = 0; n < Math.min(2, layers.length); n++) {
      const a = this.arrowLayer(n, layers[n]);
      arrows.push(a);
      drawn.push({
        layer: layers[n],
        ref: this.refs.get(layers[n].name) ?? 0,
        pxPerRef: this.arrowSpacing * KEY_LENGTH,
      });
    }
    // A slot no longer drawn must be uploaded again when a layer comes back to it.
    for (let n = layers.length; n < 2; n++) this.slots[n].u = null;
    this.lastArrows = drawn;

    const vp = this.viewport();
    const key = `${vp.x},${vp.y},${vp.width},${vp.height}|${this.shaderRange[0]},${this.shaderRange[1]}|${this.gl.lutVersion}|${arrows.map((a) => `${a.count},${a.pxPerUnit},${a.colour.join(',')}`).join(';')}`;
    if (this.glDirty || key !== this.glKey) {
      this.gl.draw(vp, this.shaderRange, arrows);
      this.counts.glDraws++;
      this.glDirty = false;
      this.glKey = key;
    }
    this.drawOverlay(marks, cursor);
  }

  /** The arrows of one layer in GPU slot n, rebuilt and uploaded only when its vectors changed. */
  private arrowLayer(n: number, layer: VectorLayer): ArrowSet {
    const slot = this.slots[n];
    const g = this.grid!;
    const r = this.plotRect();
    const stride = Math.max(1, Math.round((this.arrowSpacing / r.width) * g.nx));
    if (
      slot.set &&
      slot.u === layer.u &&
      slot.v === layer.v &&
      slot.stride === stride &&
      slot.reference === layer.reference &&
      sameColour(slot.set.colour, layer.colour)
    )
      return slot.set;
    if (!this.cells || this.cells.nx !== g.nx || this.cells.ny !== g.ny || this.cells.stride !== stride) {
      this.cells = { nx: g.nx, ny: g.ny, stride, list: arrowCells(g.nx, g.ny, stride) };
    }
    const cells = this.cells.list;
    if (slot.at.length < 2 * cells.length) {
      slot.at = new Float32Array(2 * cells.length);
      slot.vec = new Float32Array(2 * cells.length);
    }
    const at = slot.at;
    const vec = slot.vec;
    if (this.lengths.length < cells.length) this.lengths = new Float32Array(cells.length);
    let count = 0;
    for (const k of cells) {
      const u = layer.u[k];
      const v = layer.v[k];
      if (Number.isNaN(u) || Number.isNaN(v) || !g.ocean[k]) continue;
      const i = k % g.nx;
      const j = (k - i) / g.nx;
      at[2 * count] = ((i + 0.5) / g.nx) * 2 - 1;
      at[2 * count + 1] = ((j + 0.5) / g.ny) * 2 - 1;
      vec[2 * count] = u;
      vec[2 * count + 1] = v;
      this.lengths[count] = Math.sqrt(u * u + v * v);
      count++;
    }
    let ref: number;
    if (layer.reference !== undefined && layer.reference > 0) ref = layer.reference;
    else {
      // Steady while the run goes: a new key only when the data outgrow it or fall well inside.
      const prev = this.refs.get(layer.name) ?? 0;
      const next = keyMagnitude(this.lengths.subarray(0, count));
      ref = next > prev || next < prev / 4 ? next : prev;
    }
    this.refs.set(layer.name, ref);
    let most = 0;
    for (let k = 0; k < count; k++) if (this.lengths[k] > most) most = this.lengths[k];
    this.longest.set(layer.name, most);
    // The key magnitude gets KEY_LENGTH arrow spacings; stronger arrows are longer, in proportion.
    const pxPerUnit = ref > 0 ? (this.arrowSpacing * KEY_LENGTH * this.dpr) / ref : 0;
    const set: ArrowSet = { at, vec, count: ref > 0 ? count : 0, pxPerUnit, colour: layer.colour };
    this.gl.setArrows(n, set);
    this.counts.arrowUploads++;
    slot.u = layer.u;
    slot.v = layer.v;
    slot.stride = stride;
    slot.reference = layer.reference;
    slot.set = set;
    this.glDirty = true;
    return set;
  }

  /** Layers that were drawn last time, with their reference arrows. */
  referenceArrows(): Array<{
    name: string;
    ref: number;
    units: string;
    set: boolean;
    pxPerRef: number;
    longest: number;
    spacing: number;
  }> {
    return this.lastArrows.map((a) => ({
      name: a.layer.name,
      ref: a.ref,
      units: a.layer.units,
      set: a.layer.reference !== undefined,
      pxPerRef: a.pxPerRef,
      longest: this.longest.get(a.layer.name) ?? 0,
      spacing: this.arrowSpacing,
    }));
  }

  forgetArrows(): void {
    this.lastArrows = [];
    this.overlayKey = '';
  }

  private drawOverlay(marks: Mark[], cursor: { i: number; j: number } | null): void {
    const g = this.grid!;
    const refsKey = this.lastArrows
      .map((a) => `${a.layer.name}:${a.ref}:${a.pxPerRef}:${a.layer.units}:${a.layer.colour.join(',')}`)
      .join(';');
    const key = `${this.cssW}x${this.cssH}@${this.dpr}|${marks.map((m) => `${m.name}:${m.lon}:${m.lat}`).join(';')}|${cursor ? `${cursor.i},${cursor.j}` : ''}|${refsKey}`;
    if (key === this.overlayKey) return;
    const ctx = this.overlay.getContext('2d');
    if (!ctx) return;
    this.overlayKey = key;
    this.counts.overlayDraws++;
    const d = this.dpr;
    ctx.setTransform(d, 0, 0, d, 0, 0);
    ctx.clearRect(0, 0, this.cssW, this.cssH);
    const r = this.plotRect();
    ctx.font = '11px system-ui, sans-serif';
    ctx.lineWidth = 1;

    // Graticule: thin dark lines over the field, labels in the margins.
    const lonStep = graticuleStep(g.lonEast - g.lonWest, Math.max(3, Math.floor(r.width / 70)));
    const latStep = graticuleStep(g.latNorth - g.latSouth, Math.max(2, Math.floor(r.height / 35)));
    ctx.fillStyle = '#222';
    drawAxes(
      ctx,
      { x: r.left, y: r.top, w: r.width, h: r.height },
      { values: graticuleLines(g.lonWest, g.lonEast, lonStep), at: (lon) => this.pixelOf(lon, 0)[0], label: lonLabel },
      {
        values: graticuleLines(g.latSouth, g.latNorth, latStep),
        at: (lat) => this.pixelOf(g.lonWest, lat)[1],
        label: latLabel,
        stroke: (lat) => (lat === 0 ? 'rgba(0,0,0,0.5)' : undefined),
      },
      'rgba(0,0,0,0.28)',
    );

    // Probes: a ring and the name.
    ctx.textAlign = 'left';
    for (const m of marks) {
      const [x, y] = this.pixelOf(m.lon, m.lat);
      ctx.strokeStyle = '#000';
      ctx.fillStyle = '#fff';
      ctx.beginPath();
      ctx.arc(x, y, 4, 0, 2 * Math.PI);
      ctx.fill();
      ctx.stroke();
      ctx.fillStyle = '#000';
      // Near the east edge the name goes to the left of the mark, so it is never cut.
      const w = ctx.measureText(m.name).width;
      if (x + 6 + w > r.left + r.width) {
        ctx.textAlign = 'right';
        ctx.fillText(m.name, x - 6, y - 7);
        ctx.textAlign = 'left';
      } else ctx.fillText(m.name, x + 6, y - 7);
    }

    if (cursor) {
      const w = r.width / g.nx;
      const h = r.height / g.ny;
      const x = r.left + cursor.i * w;
      const y = r.top + (g.ny - 1 - cursor.j) * h;
      ctx.strokeStyle = '#000';
      ctx.lineWidth = 2;
      ctx.strokeRect(x - 1, y - 1, w + 2, h + 2);
      ctx.lineWidth = 1;
    }

    // Reference arrows in a white box in the top-right corner.
    const refs = this.lastArrows.filter((a) => a.ref > 0);
    if (refs.length) {
      ctx.font = '12px system-ui, sans-serif';
      const text = (a: (typeof refs)[number]) => `${formatKey(a.ref)} ${a.layer.units} ${a.layer.name}`;
      const boxW = Math.max(...refs.map((a) => a.pxPerRef + 18 + ctx.measureText(text(a)).width));
      const boxH = 8 + 18 * refs.length;
      const bx = r.left + r.width - boxW - 4;
      const by = r.top + 4;
      ctx.fillStyle = 'rgba(255,255,255,0.85)';
      ctx.fillRect(bx, by, boxW, boxH);
      refs.forEach((a, n) => {
        const y = by + 13 + 18 * n;
        const [cr, cg, cb] = a.layer.colour;
        ctx.strokeStyle = `rgb(${cr},${cg},${cb})`;
        ctx.lineWidth = 1.5;
        const x0 = bx + 6;
        const x1 = x0 + a.pxPerRef;
        ctx.beginPath();
        ctx.moveTo(x0, y);
        ctx.lineTo(x1, y);
        ctx.lineTo(x1 - 0.28 * a.pxPerRef, y - 0.22 * a.pxPerRef);
        ctx.moveTo(x1, y);
        ctx.lineTo(x1 - 0.28 * a.pxPerRef, y + 0.22 * a.pxPerRef);
        ctx.stroke();
        ctx.lineWidth = 1;
        ctx.fillStyle = '#000';
        ctx.textBaseline = 'middle';
        ctx.fillText(text(a), x1 + 6, y);
      });
    }
  }

  /** The map as one picture: field, arrows and overlay. */
  compose(): HTMLCanvasElement {
    const out = document.createElement('canvas');
    out.width = this.glCanvas.width;
    out.height = this.glCanvas.height;
    const ctx = out.getContext('2d')!;
    ctx.drawImage(this.glCanvas, 0, 0);
    ctx.drawImage(this.overlay, 0, 0);
    return out;
  }
}

/** A key magnitude as written beside its arrow: "0.25", "2.5e-5". */
function formatKey(v: number): string {
  return v >= 1e-3 && v < 1e5 ? String(Number(v.toPrecision(3))) : v.toExponential(1);
}
