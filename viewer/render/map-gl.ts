// The basin map in WebGL (regl): a field as a float texture read through a 256-entry colour
// lookup texture, land in neutral grey from the ocean mask, and arrows drawn as instanced line
// segments. Only drawing happens here; the values come from the frames as they are.

import createREGL from 'regl';
import type { Regl, Texture2D, Buffer } from 'regl';
import { LAND_GREY, LUT_SIZE } from './colour-maps.ts';

export interface Viewport {
  /** Plot area inside the canvas, device pixels, origin bottom-left (as WebGL counts). */
  x: number;
  y: number;
  width: number;
  height: number;
}

export interface ArrowSet {
  /** Arrow tails in clip coordinates of the plot area, and vectors in data units. */
  at: Float32Array;
  vec: Float32Array;
  count: number;
  /** Device pixels per data unit (e.g. per m s-1). */
  pxPerUnit: number;
  colour: [number, number, number];
}

/** Thrown when the browser gives no WebGL: the page shows its message instead of a map. */
export class NoWebGLError extends Error {
  override name = 'NoWebGLError';
}

const QUAD = [-1, -1, 1, -1, -1, 1, -1, 1, 1, -1, 1, 1];
// Shaft and two barbs of a unit arrow along +x: (along, across) pairs, drawn as lines.
const ARROW = [0, 0, 1, 0, 1, 0, 0.72, 0.22, 1, 0, 0.72, -0.22];

export class MapRenderer {
  readonly regl: Regl;
  readonly floatTextures: boolean;
  private fieldTex: Texture2D;
  private maskTex: Texture2D;
  private lutTex: Texture2D;
  private scratch = new Float32Array(0);
  private bytes = new Uint8Array(0);
  private nx = 1;
  private ny = 1;
  private drawField: (props: { viewport: Viewport; range: [number, number] }) => void;
  private drawArrows: (props: { viewport: Viewport; count: number; pxToClip: [number, number]; pxPerUnit: number; colour: [number, number, number]; at: Buffer; vec: Buffer }) => void;
  private atBuf: Buffer;
  private vecBuf: Buffer;
  private atBuf2: Buffer;
  private vecBuf2: Buffer;
  private lutName = '';

  constructor(readonly canvas: HTMLCanvasElement, options: { forceBytes?: boolean } = {}) {
    let regl: Regl;
    try {
      regl = createREGL({
        canvas,
        optionalExtensions: ['OES_texture_float', 'ANGLE_instanced_arrays'],
        // Kept so the PNG export and the tests can read the picture after it was drawn.
        attributes: { preserveDrawingBuffer: true, antialias: false },
      });
    } catch (e) {
      throw new NoWebGLError(e instanceof Error ? e.message : String(e));
    }
    this.regl = regl;
    this.floatTextures = !options.forceBytes && regl.hasExtension('OES_texture_float');
    const instanced = regl.hasExtension('ANGLE_instanced_arrays');
    this.fieldTex = regl.texture({ width: 1, height: 1, format: 'luminance', type: this.floatTextures ? 'float' : 'uint8' });
    this.maskTex = regl.texture({ width: 1, height: 1, format: 'luminance', data: new Uint8Array([255]) });
    this.lutTex = regl.texture({ width: LUT_SIZE, height: 1, data: new Uint8Array(LUT_SIZE * 4), min: 'linear', mag: 'linear' });
    this.atBuf = regl.buffer({ usage: 'dynamic', type: 'float', length: 4 });
    this.vecBuf = regl.buffer({ usage: 'dynamic', type: 'float', length: 4 });
    this.atBuf2 = regl.buffer({ usage: 'dynamic', type: 'float', length: 4 });
    this.vecBuf2 = regl.buffer({ usage: 'dynamic', type: 'float', length: 4 });

    this.drawField = regl({
      vert: `
        precision highp float;
        attribute vec2 position;
        varying vec2 uv;
        void main() { uv = 0.5 * (position + 1.0); gl_Position = vec4(position, 0.0, 1.0); }`,
      frag: `
        precision highp float;
        uniform sampler2D field;
        uniform sampler2D mask;
        uniform sampler2D lut;
        uniform vec2 range;
        uniform vec3 land;
        varying vec2 uv;
        void main() {
          if (texture2D(mask, uv).r < 0.5) { gl_FragColor = vec4(land, 1.0); return; }
          float v = texture2D(field, uv).r;
          float t = clamp((v - range.x) / (range.y - range.x), 0.0, 1.0);
          gl_FragColor = texture2D(lut, vec2((t * ${LUT_SIZE - 1}.0 + 0.5) / ${LUT_SIZE}.0, 0.5));
        }`,
      attributes: { position: QUAD },
      uniforms: {
        field: () => this.fieldTex,
        mask: () => this.maskTex,
        lut: () => this.lutTex,
        range: regl.prop<{ range: [number, number] }, 'range'>('range'),
        land: LAND_GREY.map((c) => c / 255),
      },
      viewport: regl.prop<{ viewport: Viewport }, 'viewport'>('viewport'),
      count: 6,
      depth: { enable: false },
    }) as never;

    this.drawArrows = regl({
      vert: `
        precision highp float;
        attribute vec2 corner;
        attribute vec2 at;
        attribute vec2 vec;
        uniform vec2 pxToClip;
        uniform float pxPerUnit;
        void main() {
          vec2 d = vec * pxPerUnit;
          vec2 n = vec2(-d.y, d.x);
          gl_Position = vec4(at + (corner.x * d + corner.y * n) * pxToClip, 0.0, 1.0);
        }`,
      frag: `
        precision highp float;
        uniform vec3 colour;
        void main() { gl_FragColor = vec4(colour, 1.0); }`,
      attributes: {
        corner: ARROW,
        at: { buffer: regl.prop<{ at: Buffer }, 'at'>('at'), divisor: 1 },
        vec: { buffer: regl.prop<{ vec: Buffer }, 'vec'>('vec'), divisor: 1 },
      },
      uniforms: {
        pxToClip: regl.prop<{ pxToClip: [number, number] }, 'pxToClip'>('pxToClip'),
        pxPerUnit: regl.prop<{ pxPerUnit: number }, 'pxPerUnit'>('pxPerUnit'),
        colour: regl.prop<{ colour: [number, number, number] }, 'colour'>('colour'),
      },
      primitive: 'lines',
      count: ARROW.length / 2,
      instances: regl.prop<{ count: number }, 'count'>('count'),
      viewport: regl.prop<{ viewport: Viewport }, 'viewport'>('viewport'),
      depth: { enable: false },
    }) as never;
    if (!instanced) {
      // Without instancing there are no arrows; the map itself still works.
      this.drawArrows = () => undefined;
    }
  }

  setGrid(nx: number, ny: number, ocean: Uint8Array): void {
    this.nx = nx;
    this.ny = ny;
    const m = new Uint8Array(nx * ny);
    for (let k = 0; k < m.length; k++) m[k] = ocean[k] ? 255 : 0;
    this.maskTex({ width: nx, height: ny, format: 'luminance', data: m, min: 'nearest', mag: 'nearest' });
    this.scratch = new Float32Array(nx * ny);
    this.bytes = new Uint8Array(nx * ny);
  }

  setColourMap(name: string, lut: Uint8Array): void {
    if (name === this.lutName) return;
    this.lutName = name;
    this.lutTex({ width: LUT_SIZE, height: 1, data: lut, min: 'linear', mag: 'linear' });
  }

  /** Upload a field (NaN on land) and return the range the shader should use. */
  setField(values: Float32Array, range: { min: number; max: number }): [number, number] {
    const n = this.nx * this.ny;
    if (this.floatTextures) {
      // NaN in a texture is undefined behaviour on some drivers: land is drawn from the mask anyway.
      for (let k = 0; k < n; k++) {
        const v = values[k];
        this.scratch[k] = v === v ? v : 0;
      }
      this.fieldTex({ width: this.nx, height: this.ny, format: 'luminance', type: 'float', data: this.scratch, min: 'nearest', mag: 'nearest' });
      return [range.min, range.max];
    }
    // Fallback for browsers without float textures: the position in the range, in 8 bits.
    const span = range.max - range.min;
    for (let k = 0; k < n; k++) {
      const t = (values[k] - range.min) / span;
      this.bytes[k] = t === t ? Math.round(255 * Math.min(1, Math.max(0, t))) : 0;
    }
    this.fieldTex({ width: this.nx, height: this.ny, format: 'luminance', type: 'uint8', data: this.bytes, min: 'nearest', mag: 'nearest' });
    return [0, 1];
  }

  draw(viewport: Viewport, range: [number, number], arrows: ArrowSet[]): void {
    const regl = this.regl;
    regl.poll();
    regl.clear({ color: [1, 1, 1, 1] });
    this.drawField({ viewport, range });
    arrows.slice(0, 2).forEach((a, i) => {
      if (a.count === 0) return;
      const at = i === 0 ? this.atBuf : this.atBuf2;
      const vec = i === 0 ? this.vecBuf : this.vecBuf2;
      at({ usage: 'dynamic', type: 'float', data: a.at.subarray(0, 2 * a.count) });
      vec({ usage: 'dynamic', type: 'float', data: a.vec.subarray(0, 2 * a.count) });
      this.drawArrows({
        viewport,
        count: a.count,
        pxToClip: [2 / viewport.width, 2 / viewport.height],
        pxPerUnit: a.pxPerUnit,
        colour: a.colour.map((c) => c / 255) as [number, number, number],
        at,
        vec,
      });
    });
  }

  destroy(): void {
    this.regl.destroy();
  }
}
