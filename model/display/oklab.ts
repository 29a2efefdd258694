// OKLab, the perceptual colour space of Björn Ottosson ("A perceptual color space for image
// processing", 2020), written from his published matrices: sRGB (IEC 61966-2-1 transfer curve)
// to linear light, linear sRGB to LMS cone responses, a cube root, LMS to Lab; and back. OKLCh
// is the same space in polar form (chroma, hue in degrees). Our colour maps are laid out here.

import * as pm from '../portable-math.ts';

export type Rgb = [number, number, number];
export type Lab = [number, number, number];

/** sRGB component 0..1 to linear light (the standard's piecewise curve). */
export function toLinear(c: number): number {
  return c <= 0.04045 ? c / 12.92 : pm.pow((c + 0.055) / 1.055, 2.4);
}

export function fromLinear(c: number): number {
  return c <= 0.0031308 ? 12.92 * c : 1.055 * pm.pow(c, 1 / 2.4) - 0.055;
}

function cbrt(x: number): number {
  return x < 0 ? -pm.pow(-x, 1 / 3) : x === 0 ? 0 : pm.pow(x, 1 / 3);
}

/** Linear sRGB (0..1) to OKLab. */
export function linearToOklab([r, g, b]: Rgb): Lab {
  const l = cbrt(0.4122214708 * r + 0.5363325363 * g + 0.0514459929 * b);
  const m = cbrt(0.2119034982 * r + 0.6806995451 * g + 0.1073969566 * b);
  const s = cbrt(0.0883024619 * r + 0.2817188376 * g + 0.6299787005 * b);
  return [
    0.2104542553 * l + 0.793617785 * m - 0.0040720468 * s,
    1.9779984951 * l - 2.428592205 * m + 0.4505937099 * s,
    0.0259040371 * l + 0.7827717662 * m - 0.808675766 * s,
  ];
}

/** OKLab to linear sRGB (may fall outside 0..1: out of the sRGB gamut). */
export function oklabToLinear([L, a, b]: Lab): Rgb {
  const l = L + 0.3963377774 * a + 0.2158037573 * b;
  const m = L - 0.1055613458 * a - 0.0638541728 * b;
  const s = L - 0.0894841775 * a - 1.291485548 * b;
  const l3 = l * l * l;
  const m3 = m * m * m;
  const s3 = s * s * s;
  return [
    4.0767416621 * l3 - 3.3077115913 * m3 + 0.2309699292 * s3,
    -1.2684380046 * l3 + 2.6097574011 * m3 - 0.3413193965 * s3,
    -0.0041960863 * l3 - 0.7034186147 * m3 + 1.707614701 * s3,
  ];
}

/** 8-bit sRGB to OKLab. */
export function srgb8ToOklab(rgb: readonly number[]): Lab {
  return linearToOklab([toLinear(rgb[0] / 255), toLinear(rgb[1] / 255), toLinear(rgb[2] / 255)]);
}

/** OKLCh (L, chroma, hue in degrees) to OKLab. */
export function lchToLab(L: number, C: number, hueDeg: number): Lab {
  const h = (hueDeg * Math.PI) / 180;
  return [L, C * pm.cos(h), C * pm.sin(h)];
}

const inGamut = (c: Rgb) => c.every((x) => x >= -1e-6 && x <= 1 + 1e-6);

/**
 * The colour of OKLCh (L, C, h) in 8-bit sRGB, with the chroma lowered as far as needed to stay
 * inside the sRGB gamut: the lightness and the hue are kept exactly, so a map laid out with a
 * monotonic lightness stays monotonic.
 */
export function lchToSrgb8(L: number, C: number, hueDeg: number): Rgb {
  let c = C;
  if (!inGamut(oklabToLinear(lchToLab(L, c, hueDeg)))) {
    let lo = 0;
    let hi = C;
    for (let k = 0; k < 30; k++) {
      const mid = (lo + hi) / 2;
      if (inGamut(oklabToLinear(lchToLab(L, mid, hueDeg)))) lo = mid;
      else hi = mid;
    }
    c = lo;
  }
  const lin = oklabToLinear(lchToLab(L, c, hueDeg));
  return lin.map((x) => Math.round(255 * fromLinear(Math.min(1, Math.max(0, x))))) as Rgb;
}

/** Euclidean distance in OKLab (a just-noticeable difference is about 0.02). */
export function deltaE(p: Lab, q: Lab): number {
  return Math.sqrt((p[0] - q[0]) * (p[0] - q[0]) + (p[1] - q[1]) * (p[1] - q[1]) + (p[2] - q[2]) * (p[2] - q[2]));
}
