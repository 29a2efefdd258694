// The formula language: valid expressions agree with the same expression written in TypeScript;
// bad ones fail with a message that says what and where; nothing reaches JavaScript objects.
import { describe, expect, it } from 'vitest';
import { compileFormula, FormulaError, MAX_FORMULA_DEPTH, MAX_FORMULA_LENGTH } from '../../model/forcing/formula.ts';

const points: Array<[number, number, number]> = [
  [130, -5, 0],
  [180.5, 0.25, 12.5],
  [265, 7, 200],
  [150, -12, 365],
];

describe('formula: valid expressions', () => {
  const cases: Array<[string, (lon: number, lat: number, t: number) => number]> = [
    ['1 + 2 * 3 - 4 / 8', () => 1 + 2 * 3 - 4 / 8],
    ['lon + lat * t', (x, y, t) => x + y * t],
    ['-lat^2', (_x, y) => -(y ** 2)],
    ['exp(-lat^2 / (2 * 3^2))', (_x, y) => Math.exp(-(y ** 2) / (2 * 3 ** 2))],
    ['(-lat)^2', (_x, y) => (-y) ** 2],
    ['2^3^2', () => 2 ** (3 ** 2)],
    ['2 ^ -1', () => 0.5],
    [
      '-0.05 * cos(pi * lat / 30) * (1 - 0.6 * exp(-((lat - 6)^2) / 8))',
      (_x, y) => -0.05 * Math.cos((Math.PI * y) / 30) * (1 - 0.6 * Math.exp(-((y - 6) ** 2) / 8)),
    ],
    [
      'sin(2*pi*t/365) + tan(0.1) + tanh(lat/5) + sqrt(abs(lat)) + log(lon) + floor(lat/4)',
      (x, y, t) =>
        Math.sin((2 * Math.PI * t) / 365) +
        Math.tan(0.1) +
        Math.tanh(y / 5) +
        Math.sqrt(Math.abs(y)) +
        Math.log(x) +
        Math.floor(y / 4),
    ],
    [
      'atan2(lat, lon - 180) + pow(2, lat/10) + min(lat, 0, 3) + max(lat, 1)',
      (x, y) => Math.atan2(y, x - 180) + 2 ** (y / 10) + Math.min(y, 0, 3) + Math.max(y, 1),
    ],
    ['clamp(lat / 5, -1, 1)', (_x, y) => Math.min(Math.max(y / 5, -1), 1)],
    ['gauss(lat - 2, 4)', (_x, y) => Math.exp(-((y - 2) ** 2) / (2 * 16))],
    ['if(lat > 0, 1, -1) * (lon >= 180 ? 2 : 3)', (x, y) => (y > 0 ? 1 : -1) * (x >= 180 ? 2 : 3)],
    ['(lat < 0) + (lat <= 0) + (lat == 7) + (lat != 7)', (_x, y) => +(y < 0) + +(y <= 0) + +(y === 7) + +(y !== 7)],
    ['lat > -10 && lat < 5 || t > 300', (_x, y, t) => +((y > -10 && y < 5) || t > 300)],
    ['!(lat > 0)', (_x, y) => +!(y > 0)],
    [
      'e^1 + rad(180) + deg(pi) + step(lat) + sign(lat) + hypot(3, 4)',
      (_x, y) => Math.E + Math.PI + 180 + (y >= 0 ? 1 : 0) + Math.sign(y) + 5,
    ],
    ['1.5e-2 * .5', () => 0.0075],
    ['  lat  ', (_x, y) => y],
  ];
  for (const [src, ts] of cases) {
    it(src, () => {
      const f = compileFormula(src);
      for (const [x, y, t] of points) expect(f.evaluate(x, y, t)).toBeCloseTo(ts(x, y, t), 12);
    });
  }

  it('knows whether it reads t', () => {
    expect(compileFormula('lat + lon').usesTime).toBe(false);
    expect(compileFormula('lat * sin(t)').usesTime).toBe(true);
  });

  it('evaluates only the chosen branch of if()', () => {
    // log(-1) would be NaN; the branch is not taken.
    expect(compileFormula('if(lat > 0, log(lat), 0)').evaluate(0, -3, 0)).toBe(0);
  });
});

function failure(src: string): FormulaError {
  try {
    compileFormula(src);
  } catch (err) {
    expect(err).toBeInstanceOf(FormulaError);
    return err as FormulaError;
  }
  throw new Error(`'${src}' compiled, but it should not`);
}

describe('formula: bad input', () => {
  it('unknown name, with its place', () => {
    const e = failure('lat + lonn * 2');
    expect(e.message).toBe("unknown name 'lonn' at character 6");
    expect(e.index).toBe(6);
  });

  it('syntax error with the position', () => {
    expect(failure('sin(lat').message).toMatch(/^syntax error at character 7/);
    expect(failure('lat + * 2').message).toMatch(/^syntax error at character \d+: Expected expression/);
    expect(failure('1 +').message).toBe('syntax error at character 3: Expected expression after +');
    // The power is written '^' in our syntax, and the message says '^' (jsep reads it as **).
    expect(failure('lat^^2').message).toBe(
      "syntax error at character 4: '^' must be followed by a number, a name or a bracket",
    );
    expect(failure('lat^^2').message).not.toMatch(/\*\*/);
  });

  it('wrong number of arguments', () => {
    expect(failure('sin(lat, lon)').message).toBe('sin() takes 1 argument, got 2 at character 0');
    expect(failure('lat + atan2(lat)').message).toBe('atan2() takes 2 arguments, got 1 at character 6');
    expect(failure('max(1)').message).toMatch(/max\(\) takes at least 2 arguments, got 1/);
    expect(failure('if(lat, 1)').message).toMatch(/if\(\) takes 3 arguments/);
  });

  it('unknown functions and misuse of names', () => {
    expect(failure('foo(lat)').message).toBe("unknown function 'foo' at character 0");
    expect(failure('lat(2)').message).toMatch(/'lat' is not a function/);
    expect(failure('sin + 1').message).toMatch(/'sin' is a function/);
  });

  it('too long', () => {
    const e = failure('1+'.repeat(MAX_FORMULA_LENGTH) + '1');
    expect(e.message).toMatch(/formula too long: \d+ characters \(at most 2000\)/);
  });

  it('too deep (brackets, and operators)', () => {
    expect(failure('('.repeat(60) + 'lat' + ')'.repeat(60)).message).toMatch(/nested too deeply/);
    expect(failure('sin('.repeat(60) + 'lat' + ')'.repeat(60)).message).toMatch(/nested too deeply/);
    // A chain of one precedence is one level however long (it used to be refused as "nested too
    // deeply"); real nesting, a tower of powers or of signs, still is.
    const chain = Array.from({ length: MAX_FORMULA_DEPTH + 20 }, () => 'lat').join('+');
    expect(compileFormula(chain).evaluate(0, 2, 0)).toBe(2 * (MAX_FORMULA_DEPTH + 20));
    expect(failure(Array.from({ length: MAX_FORMULA_DEPTH + 20 }, () => '2').join('^')).message).toMatch(
      /nested too deeply \(more than 100 levels\)/,
    );
    expect(failure('-'.repeat(MAX_FORMULA_DEPTH + 20) + 'lat').message).toMatch(
      /nested too deeply \(more than 100 levels\)/,
    );
  });

  it('no property access: constructor.constructor, __proto__, [ ]', () => {
    expect(failure('constructor.constructor').message).toBe(
      "property access ('.' or '[ ]') is not allowed at character 0",
    );
    expect(failure("lat['constructor']").message).toMatch(/property access/);
    expect(failure('sin.call(1)').message).toMatch(/property access/);
    expect(failure('__proto__').message).toBe("unknown name '__proto__' at character 0");
    expect(failure('constructor').message).toMatch(/unknown name 'constructor'/);
    expect(failure('toString()').message).toMatch(/unknown function 'toString'/);
    expect(failure('hasOwnProperty(1)').message).toMatch(/unknown function/);
  });

  it("'this'", () => {
    expect(failure('this').message).toBe("'this' is not allowed at character 0");
  });

  it('assignment', () => {
    expect(failure('lat = 1').message).toMatch(/^syntax error at character 4: Unexpected "="/);
    expect(failure('lat += 1').message).toMatch(/syntax error|not allowed/);
  });

  it('strings, booleans, lists, several expressions', () => {
    expect(failure('"abc"').message).toMatch(/text strings are not allowed/);
    expect(failure("lat + 'x'").message).toBe('text strings are not allowed, only numbers at character 6');
    expect(failure('true').message).toMatch(/'true' is not allowed/);
    expect(failure('[1, 2]').message).toMatch(/lists/);
    expect(failure('lat, lon').message).toMatch(/single expression/);
    expect(failure('lat; lon').message).toMatch(/single expression/);
  });

  it('operators outside the language, at the operator', () => {
    expect(failure('lat % 2').message).toBe(
      "operator '%' is not allowed (there is no remainder operator) at character 4",
    );
    expect(failure('lat === 2').message).toMatch(/operator '===' is not allowed \(use '=='\)/);
    expect(failure('lat << 2').message).toMatch(/operator '<<' is not allowed at character 4/);
    expect(failure('~lat').message).toMatch(/operator '~' is not allowed/);
  });

  it('empty', () => {
    expect(failure('   ').message).toMatch(/empty/);
  });

  it('leaves the shared jsep tables alone (^ stays xor for other users)', async () => {
    const jsep = (await import('jsep')).default;
    compileFormula('lat^2');
    const tree = jsep('a ^ b * c') as unknown as { operator: string };
    expect(tree.operator).toBe('^');
  });
});
