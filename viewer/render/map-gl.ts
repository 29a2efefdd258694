// The basin map in WebGL (regl): a field as a float texture read through a 256-entry colour
// lookup texture, land in neutral grey (marked in the field texture from the ocean mask), and
// arrows drawn as instanced line segments. Only drawing happens here; the values come from the
// frames as they are. Uploads are separate from drawing, so a caller sends a field or arrows to
// the GPU only when they changed; textures and buffers are allocated once per grid.

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

/** Float-texture value that marks land; the fields' own values never come near it. */
const LAND = -1e30;

export class MapRenderer {
  readonly regl: Regl;
  readonly floatTextures: boolean;
  private fieldTex: Texture2D;
  private lutTex: Texture2D;
  /** The texels of the field, land folded in, reused for every upload. */
  private texels: Float32Array | Uint8Array = new Float32Array(0);
  private ocean = new Uint8Array(0);
  private nx = 1;
  private ny = 1;
  private drawField: (props: { viewport: Viewport; range: [number, number] }) => void;
  private drawArrows: (props: {
    viewport: Viewport;
    count: number;
    pxToClip: [number, number];
    pxPerUnit: number;
    colour: [number, number, number];
    at: Buffer;
    vec: Buffer;
  }) => void;
  /** One pair of instance buffers per arrow layer (at most two), grown only when too small. */
  private arrowBufs: Array<{ at: Buffer; vec: Buffer; floats: number }> = [];
  private lutName = '';
  /** Bumped on every new colour map, so a caller knows the picture must be drawn again. */
  lutVersion = 0;
  private readonly instanced: boolean;

  constructor(
    readonly canvas: HTMLCanvasElement,
    options: { forceBytes?: boolean } = {},
  ) {
    let regl: Regl;
    try {
      regl = createREGL({
        canvas,
        optionalExtensions: ['OES_texture_float', 'ANGLE_instanced_arrays'],
        // Kept so the PNG export and the tests can read the picture after it was drawn.
        attributes: { preserveDrawingBuffer: true, antialias: false },
      });
    } catch (e) {
      // A Content-Security-Policy without 'unsafe-eval' stops regl's code generation: not a
      // missing WebGL, and the page says which (viewer/main.ts).
      if (e instanceof EvalError) throw e;
      throw new NoWebGLError(e instanceof Error ? e.message : String(e));
    }
    this.regl = regl;
    this.floatTextures = !options.forceBytes && regl.hasExtension('OES_texture_float');
    this.instanced = regl.hasExtension('ANGLE_instanced_arrays');
    this.fieldTex = regl.texture({
      width: 1,
      height: 1,
      format: 'luminance',
      type: this.floatTextures ? 'float' : 'uint8',
    });
    this.lutTex = regl.texture({
      width: LUT_SIZE,
      height: 1,
      data: new Uint8Array(LUT_SIZE * 4),
      min: 'linear',
      mag: 'linear',
    });
    for (let n = 0; n < 2; n++) {
      this.arrowBufs.push({
        at: regl.buffer({ usage: 'dynamic', type: 'float', length: 4 }),
        vec: regl.buffer({ usage: 'dynamic', type: 'float', length: 4 }),
        floats: 1,
      });
    }

    // Land travels in the field texture itself (a sentinel), so a pixel costs two texture reads,
    // not three: SwiftShader (no GPU) shades every pixel on the CPU.
    const decode = this.floatTextures
      ? `float v = texture2D(field, uv).r;
          if (v < -0.5e30) { gl_FragColor = vec4(land, 1.0); return; }
          float t = clamp((v - range.x) / (range.y - range.x), 0.0, 1.0);`
      : `float b = texture2D(field, uv).r * 255.0;
          if (b < 0.5) { gl_FragColor = vec4(land, 1.0); return; }
          float t = (b - 1.0) / 254.0;`;
    this.drawField = regl({
      vert: `
        precision highp float;
        attribute vec2 position;
        varying vec2 uv;
        void main() { uv = 0.5 * (position + 1.0); gl_Position = vec4(position, 0.0, 1.0); }`,
      frag: `
        precision highp float;
        uniform sampler2D field;
        uniform sampler2D lut;
        uniform vec2 range;
        uniform vec3 land;
        varying vec2 uv;
        void main() {
          ${decode}
          gl_FragColor = texture2D(lut, vec2((t * ${LUT_SIZE - 1}.0 + 0.5) / ${LUT_SIZE}.0, 0.5));
        }`,
      attributes: { position: QUAD },
      uniforms: {
        field: () => this.fieldTex,
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
    if (!this.instanced) {
      // Without instancing there are no arrows; the map itself still works.
      this.drawArrows = () => undefined;
    }
  }

  setGrid(nx: number, ny: number, ocean: Uint8Array): void {
    this.nx = nx;
    this.ny = ny;
    this.ocean = ocean.slice(0, nx * ny);
    this.texels = this.floatTextures ? new Float32Array(nx * ny) : new Uint8Array(nx * ny);
    // Storage once per grid; each new field then goes up with texSubImage2D.
    this.fieldTex({
      width: nx,
      height: ny,
      format: 'luminance',
      type: this.floatTextures ? 'float' : 'uint8',
      min: 'nearest',
      mag: 'nearest',
    });
  }

  setColourMap(name: string, lut: Uint8Array): void {
    if (name === this.lutName) return;
    this.lutName = name;
    this.lutVersion++;
    this.lutTex({ width: LUT_SIZE, height: 1, data: lut, min: 'linear', mag: 'linear' });
  }

  /** Upload a field (NaN on land) and return the range the shader should use. */
  setField(values: Float32Array, range: { min: number; max: number }): [number, number] {
    const n = this.nx * this.ny;
    const ocean = this.ocean;
    if (this.floatTextures) {
      const t = this.texels as Float32Array;
      // NaN in a texture is undefined behaviour on some drivers: land goes up as the sentinel.
      for (let k = 0; k < n; k++) {
        const v = values[k];
        t[k] = ocean[k] ? (Number.isNaN(v) ? 0 : v) : LAND;
      }
      this.fieldTex.subimage({ width: this.nx, height: this.ny, data: t });
      return [range.min, range.max];
    }
    // Fallback for browsers without float textures: 0 is land, 1..255 the position in the range.
    const t = this.texels as Uint8Array;
    const span = range.max - range.min;
    for (let k = 0; k < n; k++) {
      const p = (values[k] - range.min) / span;
      t[k] = ocean[k] ? 1 + (Number.isNaN(p) ? 0 : Math.round(254 * Math.min(1, Math.max(0, p)))) : 0;
    }
    this.fieldTex.subimage({ width: this.nx, height: this.ny, data: t });
    return [0, 1];
  }

  /**
   * Put arrow layer n (0 or 1) on the GPU. Called only when its vectors changed; the buffer is
   * re-specified only when it has to grow.
   */
  setArrows(n: number, a: ArrowSet): void {
    if (!this.instanced || n > 1) return;
    const b = this.arrowBufs[n];
    const floats = 2 * a.count;
    if (floats === 0) return;
    if (floats > b.floats) {
      b.at({ usage: 'dynamic', type: 'float', data: a.at.subarray(0, floats) });
      b.vec({ usage: 'dynamic', type: 'float', data: a.vec.subarray(0, floats) });
      b.floats = floats;
    } else {
      b.at.subdata(a.at.subarray(0, floats));
      b.vec.subdata(a.vec.subarray(0, floats));
    }
  }

  /** Draw what was uploaded: the field, then the arrow layers set with setArrows. */
  draw(viewport: Viewport, range: [number, number], arrows: ArrowSet[]): void {
    const regl = this.regl;
    regl.poll();
    regl.clear({ color: [1, 1, 1, 1] });
    this.drawField({ viewport, range });
    for (let i = 0; i < Math.min(2, arrows.length); i++) {
      const a = arrows[i];
      if (a.count === 0) continue;
      this.drawArrows({
        viewport,
        count: a.count,
        pxToClip: [2 / viewport.width, 2 / viewport.height],
        pxPerUnit: a.pxPerUnit,
        colour: [a.colour[0] / 255, a.colour[1] / 255, a.colour[2] / 255],
        at: this.arrowBufs[i].at,
        vec: this.arrowBufs[i].vec,
      });
    }
  }

  destroy(): void {
    this.regl.destroy();
  }
}
