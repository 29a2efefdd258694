// The portable elementary functions (model/portable-math.ts): against Node's Math over seeded
// random arguments (max ulp difference per function and range), against correctly rounded values
// of well-known constants, special cases, symmetry, monotonicity across the methods' breakpoints,
// and huge trig arguments. Node's Math is itself a port of fdlibm for most of these; what matters
// for the model is that ours are pure IEEE arithmetic and so the same on every host.

import { endianness } from 'node:os';
import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import * as pm from '../../model/portable-math.ts';
import { littleEndian } from '../../model/math/bits.ts';
import { twoOverPiBits } from '../../model/math/trig-reduction.ts';

const f64 = new Float64Array(1);
const i64 = new BigInt64Array(f64.buffer);
/** Doubles mapped to integers in order (so that a difference of 1 is 1 ulp; -0 and +0 both 0). */
function ordinal(x: number): bigint {
  f64[0] = x;
  const b = i64[0];
  return b < 0n ? -(b & 0x7fffffffffffffffn) : b;
}
function ulps(a: number, b: number): number {
  if (Number.isNaN(a) && Number.isNaN(b)) return 0;
  if (Number.isNaN(a) || Number.isNaN(b)) return Infinity;
  return Math.abs(Number(ordinal(a) - ordinal(b)));
}
function next(x: number, steps: number): number {
  f64[0] = x;
  i64[0] += BigInt(steps); // for positive x
  return f64[0];
}

type One = (x: number) => number;
/** [name, ours, Node's, low, high, logarithmic sampling, bound in ulp]. */
const RANGES: Array<[string, One, One, number, number, boolean, number]> = [
  ['exp', pm.exp, Math.exp, -745, 709.7, false, 1],
  ['exp near 0', pm.exp, Math.exp, -1, 1, false, 1],
  ['expm1', pm.expm1, Math.expm1, -40, 709, false, 1],
  ['expm1 near 0', pm.expm1, Math.expm1, -0.5, 0.5, false, 1],
  ['log', pm.log, Math.log, 1e-300, 1e300, true, 1],
  ['log near 1', pm.log, Math.log, 0.5, 2, false, 1],
  ['log of subnormals', pm.log, Math.log, 5e-324, 2e-308, true, 1],
  ['log10', pm.log10, Math.log10, 1e-300, 1e300, true, 1],
  ['sin', pm.sin, Math.sin, -10, 10, false, 1],
  ['cos', pm.cos, Math.cos, -10, 10, false, 1],
  ['tan', pm.tan, Math.tan, -10, 10, false, 1],
  ['sin to 1e6', pm.sin, Math.sin, -1e6, 1e6, false, 1],
  ['cos to 1e6', pm.cos, Math.cos, -1e6, 1e6, false, 1],
  ['tan to 1e6', pm.tan, Math.tan, -1e6, 1e6, false, 1],
  ['sin 1e6 to 1e300', pm.sin, Math.sin, 1e6, 1e300, true, 1],
  ['cos 1e6 to 1e300', pm.cos, Math.cos, 1e6, 1e300, true, 1],
  ['tan 1e6 to 1e300', pm.tan, Math.tan, 1e6, 1e300, true, 1],
  ['asin', pm.asin, Math.asin, -1, 1, false, 1],
  ['acos', pm.acos, Math.acos, -1, 1, false, 1],
  ['atan', pm.atan, Math.atan, -10, 10, false, 1],
  ['atan wide', pm.atan, Math.atan, 1e-10, 1e30, true, 1],
  ['sinh', pm.sinh, Math.sinh, -710, 710, false, 1],
  ['sinh near 0', pm.sinh, Math.sinh, -1, 1, false, 1],
  ['cosh', pm.cosh, Math.cosh, -710, 710, false, 1],
  ['tanh', pm.tanh, Math.tanh, -25, 25, false, 1],
  ['tanh near 0', pm.tanh, Math.tanh, -1, 1, false, 1],
];

function sample(rng: () => number, lo: number, hi: number, logarithmic: boolean): number {
  if (!logarithmic) return lo + (hi - lo) * rng();
  return Math.exp(Math.log(lo) + (Math.log(hi) - Math.log(lo)) * rng());
}

describe('against Node 20 Math over seeded random arguments (20 000 per range)', () => {
  for (const [name, ours, node, lo, hi, logarithmic, bound] of RANGES) {
    it(`${name}: within ${bound} ulp`, () => {
      const rng = seedrandom(`portable-math ${name}`);
      let worst = 0;
      let at = 0;
      for (let i = 0; i < 20000; i++) {
        const x = sample(rng, lo, hi, logarithmic);
        const d = ulps(ours(x), node(x));
        if (d > worst) {
          worst = d;
          at = x;
        }
      }
      expect(worst, `${name}: ${worst} ulp at ${at}`).toBeLessThanOrEqual(bound);
    });
  }

  it('pow, atan2: within 1 ulp; pow for results up to 1e308 as well', () => {
    const rng = seedrandom('portable-math pow');
    let worstPow = 0;
    let worstAtan2 = 0;
    for (let i = 0; i < 20000; i++) {
      const x = sample(rng, 1e-3, 1e3, true);
      const y = -100 + 200 * rng();
      worstPow = Math.max(worstPow, ulps(pm.pow(x, y), Math.pow(x, y)));
      // large results: y chosen so that x^y is near 1e300 or 1e-300
      const big = (rng() < 0.5 ? 690 : -690) / Math.log(x);
      worstPow = Math.max(worstPow, ulps(pm.pow(x, big), Math.pow(x, big)));
      const a = (rng() - 0.5) * Math.pow(10, 20 * rng() - 10);
      const b = (rng() - 0.5) * Math.pow(10, 20 * rng() - 10);
      worstAtan2 = Math.max(worstAtan2, ulps(pm.atan2(a, b), Math.atan2(a, b)));
    }
    expect(worstPow).toBeLessThanOrEqual(1);
    expect(worstAtan2).toBeLessThanOrEqual(1);
  });
});

/** Is h the double nearest to sqrt(a^2 + b^2)? Exact, in integers: (h -+ ulp/2)^2 brackets a^2 + b^2. */
function hypotCorrectlyRounded(a: number, b: number, h: number): boolean {
  const scale = 2n ** 1100n; // every double times 2^1100 is an integer for these ranges
  const big = (x: number) => {
    // x as an exact rational n / 2^1100 (x's bits: mantissa * 2^exponent)
    if (x === 0) return 0n;
    let e = 0;
    let m = Math.abs(x);
    while (!Number.isInteger(m)) {
      m *= 2;
      e++;
    }
    return (BigInt(m) * scale) / 2n ** BigInt(e);
  };
  const A = big(a);
  const B = big(b);
  const s = A * A + B * B;
  const lo = big(h) * 2n - (big(next(h, 1)) - big(h)); // 2 (h - ulp/2), ulp above h
  const hi = big(h) * 2n + (big(next(h, 1)) - big(h));
  return lo * lo <= 4n * s && 4n * s <= hi * hi;
}

describe('hypot', () => {
  it('is correctly rounded on 2000 seeded random pairs (checked exactly in integers)', () => {
    const rng = seedrandom('portable-math hypot');
    let bad = 0;
    for (let i = 0; i < 2000; i++) {
      const a = (rng() - 0.5) * Math.pow(10, 16 * rng() - 8);
      const b = (rng() - 0.5) * Math.pow(10, 16 * rng() - 8);
      if (!hypotCorrectlyRounded(Math.abs(a), Math.abs(b), pm.hypot(a, b))) bad++;
    }
    expect(bad).toBe(0);
  });
  it('does not overflow or underflow on the way, and keeps the ECMAScript specials', () => {
    expect(pm.hypot(3e300, 4e300)).toBe(5e300);
    expect(pm.hypot(3e-300, 4e-300)).toBe(5e-300);
    expect(pm.hypot(3, 4)).toBe(5);
    expect(pm.hypot(NaN, Infinity)).toBe(Infinity);
    expect(pm.hypot(-Infinity, NaN)).toBe(Infinity);
    expect(pm.hypot(NaN, 1)).toBeNaN();
    expect(Object.is(pm.hypot(-0, -0), 0)).toBe(true);
    expect(pm.hypot(5e-324, 0)).toBe(5e-324);
  });
});

describe('correctly rounded reference values', () => {
  // Decimal digits from the OEIS (sequence numbers given), from memory; the JavaScript parser
  // rounds a decimal string correctly (ECMAScript StringToNumber), so Number(digits) is the double
  // nearest to the true value.
  const E = Number('2.71828182845904523536028747135'); // A001113
  const LN2 = Number('0.693147180559945309417232121458'); // A002162
  const LN10 = Number('2.30258509299404568401799145468'); // A002392
  const PI = Number('3.14159265358979323846264338328'); // A000796
  const PI4 = Number('0.785398163397448309615660845820'); // A003881
  const SIN1 = Number('0.841470984807896506652502321630'); // A049469
  const COS1 = Number('0.540302305868139717400936607443'); // A049470
  const LOG10_2 = Number('0.301029995663981195213738894724'); // A007524
  const SQRT2 = Number('1.41421356237309504880168872421'); // A002193
  const SINH1 = Number('1.17520119364380145688238185060'); // A073742
  const COSH1 = Number('1.54308063481524377847790562075'); // A073743
  const TANH1 = Number('0.761594155955764888119458282605'); // A073744
  const INV_E = Number('0.367879441171442321595523770161'); // A068985
  const cases: Array<[string, number, number]> = [
    ['exp(1)', pm.exp(1), E],
    ['exp(-1)', pm.exp(-1), INV_E],
    ['expm1(1) + 1', pm.expm1(1) + 1, E],
    ['log(2)', pm.log(2), LN2],
    ['log(10)', pm.log(10), LN10],
    ['log(e)', pm.log(E), 1],
    ['log10(2)', pm.log10(2), LOG10_2],
    ['atan(1)', pm.atan(1), PI4],
    ['4 atan(1)', 4 * pm.atan(1), PI],
    ['atan2(1, -1) * 4/3', (pm.atan2(1, -1) * 4) / 3, PI],
    ['asin(1) * 2', 2 * pm.asin(1), PI],
    ['acos(-1)', pm.acos(-1), PI],
    ['sin(1)', pm.sin(1), SIN1],
    ['cos(1)', pm.cos(1), COS1],
    ['tan(pi/4)', pm.tan(PI4), 1],
    ['pow(2, 0.5)', pm.pow(2, 0.5), SQRT2],
    ['sinh(1)', pm.sinh(1), SINH1],
    ['cosh(1)', pm.cosh(1), COSH1],
    ['tanh(1)', pm.tanh(1), TANH1],
  ];
  for (const [name, got, want] of cases) {
    it(`${name} is the nearest double (within 1 ulp; ${want})`, () => {
      expect(ulps(got, want)).toBeLessThanOrEqual(1);
    });
  }
  it('exact cases are exact: log10 of powers of ten, pow with exact results', () => {
    for (let k = -20; k <= 22; k++) expect(pm.log10(Number(`1e${k}`)), `log10(1e${k})`).toBe(k);
    for (let k = 0; k <= 22; k++) expect(pm.pow(10, k), `10^${k}`).toBe(Number(`1e${k}`));
    for (let k = -1074; k <= 1023; k++) expect(pm.pow(2, k)).toBe(Math.pow(2, k));
    expect(pm.pow(3, 33)).toBe(5559060566555523); // 3^33 < 2^53
    expect(pm.pow(-2, 3)).toBe(-8);
    expect(pm.exp(0)).toBe(1);
    expect(pm.log(1)).toBe(0);
  });
  it('sin(1e22) (a well-known hard case for argument reduction, value from memory) and the bits of 2/pi', () => {
    expect(pm.sin(1e22)).toBe(-0.8522008497671888);
    // The first 120 bits of 2/pi (the table in fdlibm's k_rem_pio2.c starts so; from memory).
    const bits = twoOverPiBits().toString(16).toUpperCase();
    expect(bits.slice(0, 30)).toBe('A2F9836E4E441529FC2757D1F534DD');
  });
});

describe('special cases', () => {
  const same = (got: number, want: number) => expect(Object.is(got, want), `${got} should be ${want}`).toBe(true);
  it('NaN in, NaN out; infinities; signed zeros', () => {
    for (const f of [
      pm.exp,
      pm.expm1,
      pm.log,
      pm.log10,
      pm.sin,
      pm.cos,
      pm.tan,
      pm.asin,
      pm.acos,
      pm.atan,
      pm.sinh,
      pm.cosh,
      pm.tanh,
    ])
      same(f(NaN), NaN);
    same(pm.exp(Infinity), Infinity);
    same(pm.exp(-Infinity), 0);
    same(pm.exp(709.79), Infinity);
    same(pm.exp(-745.14), 0);
    same(pm.exp(-745.13), 5e-324); // the smallest subnormal
    same(pm.exp(-740), Math.exp(-740)); // subnormal result
    same(pm.expm1(-Infinity), -1);
    same(pm.expm1(-0), -0);
    same(pm.log(0), -Infinity);
    same(pm.log(-0), -Infinity);
    same(pm.log(-1), NaN);
    same(pm.log(Infinity), Infinity);
    same(pm.log(5e-324), -744.4400719213812);
    same(pm.log10(0), -Infinity);
    for (const f of [pm.sin, pm.tan, pm.asin, pm.atan, pm.sinh, pm.tanh]) {
      same(f(-0), -0);
      same(f(0), 0);
    }
    for (const f of [pm.sin, pm.cos, pm.tan]) {
      same(f(Infinity), NaN);
      same(f(-Infinity), NaN);
    }
    same(pm.cos(0), 1);
    same(pm.asin(1.0000000000000002), NaN);
    same(pm.acos(-1.0000000000000002), NaN);
    same(pm.acos(1), 0);
    same(pm.atan(Infinity), Math.PI / 2);
    same(pm.atan(-Infinity), -Math.PI / 2);
    same(pm.sinh(-Infinity), -Infinity);
    same(pm.sinh(711), Infinity);
    same(pm.cosh(-Infinity), Infinity);
    same(pm.cosh(710.4), Math.cosh(710.4)); // finite although exp(710.4) overflows
    same(pm.tanh(Infinity), 1);
    same(pm.tanh(-Infinity), -1);
  });
  it('atan2 over all the signed-zero and infinity combinations, as Math.atan2', () => {
    const values = [0, -0, 1, -1, Infinity, -Infinity, NaN, 5e-324, 1e300];
    for (const y of values) for (const x of values) same(pm.atan2(y, x), Math.atan2(y, x));
  });
  it('pow over the ECMAScript special cases, as the ** of this engine', () => {
    const values = [0, -0, 0.5, -0.5, 1, -1, 2, -2, 3, -3, 2.5, Infinity, -Infinity, NaN, 1e-310, 1e308];
    for (const x of values) {
      for (const y of values) {
        const want = Math.pow(x, y);
        // finite nonzero results may differ in the last bit (pow(0.5, 0.5): ours 0.56 ulp off, Node's 0.44)
        if (Number.isFinite(want) && want !== 0)
          expect(ulps(pm.pow(x, y), want), `pow(${x}, ${y})`).toBeLessThanOrEqual(1);
        else same(pm.pow(x, y), want);
      }
    }
    same(pm.pow(10, 309), Infinity);
    same(pm.pow(10, -324), 0);
    same(pm.pow(-10, 309), -Infinity);
    same(pm.pow(2, -1075), 0);
  });
});

describe('symmetry and monotonicity', () => {
  it('odd functions are odd and even ones even, bit for bit', () => {
    const rng = seedrandom('portable-math symmetry');
    for (let i = 0; i < 5000; i++) {
      const x = sample(rng, 1e-10, 1e10, true);
      for (const f of [pm.sin, pm.tan, pm.atan, pm.sinh, pm.tanh]) same(f(-x), -f(x));
      same(pm.cos(-x), pm.cos(x));
      same(pm.cosh(-x), pm.cosh(x));
      const u = rng();
      same(pm.asin(-u), -pm.asin(u));
      same(pm.atan2(-u, x), -pm.atan2(u, x));
    }
    function same(a: number, b: number) {
      if (!Object.is(a, b)) expect(a).toBe(b);
    }
  });
  it("increasing functions do not step back across their methods' breakpoints", () => {
    // [function, breakpoints of its argument reduction or polynomial ranges]
    const spots: Array<[string, One, number[]]> = [
      ['exp', pm.exp, [0.34657359027997264, 1.0397207708399179, 3.725290298461914e-9, -0.34657359027997264, 709.78]],
      ['expm1', pm.expm1, [0.34657359027997264, -0.34657359027997264, 5.551115123125783e-17, 13.862943611198906]],
      ['log', pm.log, [Math.SQRT2, Math.SQRT1_2, 1, 1 + 2 ** -20, 2.2250738585072014e-308]],
      ['log10', pm.log10, [Math.SQRT2, 1, 10, 1000]],
      ['sin', pm.sin, [Math.PI / 4, 7.450580596923828e-9, 1.5]],
      ['tan', pm.tan, [0.6744, Math.PI / 4, 1.2]],
      ['atan', pm.atan, [0.4375, 0.6875, 1.1875, 2.4375, 7.378697629483821e19]],
      ['asin', pm.asin, [0.5, 0.975, 1.4901161193847656e-8]],
      ['sinh', pm.sinh, [1, 22, 709.78]],
      ['tanh', pm.tanh, [1, 22, 2.7755575615628914e-17]],
      ['cosh', pm.cosh, [0.34657359027997264, 22, 709.78]],
    ];
    for (const [name, f, points] of spots) {
      for (const p of points) {
        const around = [];
        for (let s = -20; s <= 20; s++) around.push(p > 0 ? next(p, s) : -next(-p, -s));
        for (let i = 1; i < around.length; i++) {
          expect(f(around[i]) >= f(around[i - 1]), `${name} at ${around[i - 1]} .. ${around[i]}`).toBe(true);
        }
      }
    }
    // cos decreasing across pi/4 and acos across 1/2
    for (const [f, p] of [
      [pm.cos, Math.PI / 4],
      [pm.acos, 0.5],
      [pm.acos, -0.5],
    ] as const) {
      for (let s = -20; s < 20; s++) {
        const a = p > 0 ? next(p, s) : -next(-p, -s);
        const b = p > 0 ? next(p, s + 1) : -next(-p, -s - 1);
        expect(f(b) <= f(a)).toBe(true);
      }
    }
  });
});

describe('bit access', () => {
  it('found the byte order of this host', () => {
    expect(littleEndian).toBe(endianness() === 'LE');
  });
});
