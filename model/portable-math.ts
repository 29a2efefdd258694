// Elementary functions that give the same bits on every JavaScript host. Math.exp, Math.sin and
// friends are left to each engine (ECMAScript requires no particular accuracy), and Chromium's
// differ from Node's in the last bit for a few percent of arguments; + - * / and Math.sqrt are exact
// IEEE operations (JavaScript never fuses a multiply-add), so functions built from them alone are
// the same everywhere. Model code uses these, never Math.<transcendental> (DEVELOPERS.md; enforced by
// test/model/portable-math-usage.test.ts). Methods and accuracy: the files in model/math/.

export { exp, expm1, log, log10 } from './math/exp-log.ts';
export { sin, cos, tan } from './math/trig.ts';
export { asin, acos, atan, atan2 } from './math/inverse-trig.ts';
export { sinh, cosh, tanh } from './math/hyperbolic.ts';
export { pow } from './math/pow.ts';
export { hypot } from './math/hypot.ts';
