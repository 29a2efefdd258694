// A small, safe formula language for wind patterns: f(lon, lat, t).
//
// jsep turns the text into a syntax tree; we walk that tree once and build a tree of closures from
// a whitelist of node kinds, names, operators and functions. Nothing is ever evaluated by
// JavaScript itself (no eval, no new Function), no property of any object is ever read, and a
// name is looked up only in our own Maps, so prototype tricks have nothing to reach.
// docs/wind.md documents the language.

import jsep from 'jsep';
import { ForcingError } from './errors.ts';
import * as pm from '../portable-math.ts';

/** Longest accepted formula, characters. Plenty for a pattern; bounds parse time and recursion. */
export const MAX_FORMULA_LENGTH = 2000;
/** Deepest accepted syntax tree (every operator and call adds a level). Bounds evaluation recursion. */
export const MAX_FORMULA_DEPTH = 100;
/** Deepest bracket nesting, checked before parsing so that jsep's own recursion stays shallow. */
const MAX_BRACKETS = 50;

export class FormulaError extends ForcingError {
  override name = 'FormulaError';
  /** 0-based character position in the formula, or -1 when the error has no single place. */
  readonly index: number;
  constructor(message: string, index: number) {
    super(message);
    this.index = index;
  }
}

/** A compiled formula: lon in degrees east, lat in degrees north, t in days. */
export type FormulaFn = (lon: number, lat: number, t: number) => number;

export interface CompiledFormula {
  readonly source: string;
  readonly evaluate: FormulaFn;
  /** True when the formula reads t, so it must be re-evaluated as time goes on. */
  readonly usesTime: boolean;
}

type Expr = jsep.Expression;

// jsep exports its parser class at run time; its typings only describe the function form.
interface JsepParser {
  index: number;
  readonly expr: string;
  parse(): Expr;
  gobbleToken(): Expr | false;
  gobbleBinaryOp(): string | false;
}
const JsepBase = (jsep as unknown as { Jsep: new (expr: string) => JsepParser }).Jsep;

/**
 * jsep nodes carry no positions. This parser records where each token starts (for messages),
 * which nodes were written inside parentheses (for the power rule below), and reads '^' as power
 * without touching jsep's shared operator table (where '^' is bitwise xor).
 */
class LocatingParser extends JsepBase {
  readonly starts = new WeakMap<object, number>();
  readonly grouped = new WeakSet<object>();
  /** The last binary operator as written ('^', not the '**' it is read as), for messages. */
  lastWritten = '';
  constructor(expr: string) {
    super(expr);
  }
  override gobbleToken(): Expr | false {
    const before = this.index;
    const node = super.gobbleToken();
    if (node) {
      // gobbleToken skips spaces first; find the token's first character.
      let start = before;
      while (start < this.expr.length && /\s/.test(this.expr[start])) start++;
      if (!this.starts.has(node)) this.starts.set(node, start);
      else if (this.expr[start] === '(') this.grouped.add(node);
    }
    return node;
  }
  override gobbleBinaryOp(): string | false {
    const op = super.gobbleBinaryOp();
    if (op === false) return op;
    this.lastWritten = op;
    if (op === '^') return '**';
    // Refuse unknown operators here, where the parser still knows where they stand.
    if (!BINARY.has(op)) {
      const at = this.index - op.length;
      const hint = BINARY_HINTS.get(op);
      throw new FormulaError(`operator '${op}' is not allowed${hint ? ` (${hint})` : ''} at character ${at}`, at);
    }
    return op;
  }
}

type Closure = FormulaFn;

interface FunctionEntry {
  /** Allowed numbers of arguments: [min, max]; max = Infinity for "any number". */
  arity: [number, number];
  make(args: Closure[]): Closure;
}

function fixed1(f: (a: number) => number): FunctionEntry {
  return {
    arity: [1, 1],
    make:
      ([a]) =>
      (x, y, t) =>
        f(a(x, y, t)),
  };
}
function fixed2(f: (a: number, b: number) => number): FunctionEntry {
  return {
    arity: [2, 2],
    make:
      ([a, b]) =>
      (x, y, t) =>
        f(a(x, y, t), b(x, y, t)),
  };
}

const FUNCTIONS = new Map<string, FunctionEntry>([
  ['sin', fixed1(pm.sin)],
  ['cos', fixed1(pm.cos)],
  ['tan', fixed1(pm.tan)],
  ['asin', fixed1(pm.asin)],
  ['acos', fixed1(pm.acos)],
  ['atan', fixed1(pm.atan)],
  ['sinh', fixed1(pm.sinh)],
  ['cosh', fixed1(pm.cosh)],
  ['tanh', fixed1(pm.tanh)],
  ['exp', fixed1(pm.exp)],
  ['log', fixed1(pm.log)],
  ['log10', fixed1(pm.log10)],
  ['sqrt', fixed1(Math.sqrt)],
  ['abs', fixed1(Math.abs)],
  ['floor', fixed1(Math.floor)],
  ['ceil', fixed1(Math.ceil)],
  ['round', fixed1(Math.round)],
  ['sign', fixed1(Math.sign)],
  ['rad', fixed1((d) => (d * Math.PI) / 180)],
  ['deg', fixed1((r) => (r * 180) / Math.PI)],
  /** 1 where x >= 0, else 0. */
  ['step', fixed1((a) => (a >= 0 ? 1 : 0))],
  ['atan2', fixed2(pm.atan2)],
  ['pow', fixed2(pm.pow)],
  ['hypot', fixed2(pm.hypot)],
  /** exp(-x^2 / (2 sigma^2)): a Gaussian of standard deviation sigma, 1 at x = 0. */
  ['gauss', fixed2((a, s) => pm.exp(-(a * a) / (2 * s * s)))],
  [
    'min',
    {
      arity: [2, Infinity],
      make: (args) => (x, y, t) => {
        let m = args[0](x, y, t);
        for (let k = 1; k < args.length; k++) m = Math.min(m, args[k](x, y, t));
        return m;
      },
    },
  ],
  [
    'max',
    {
      arity: [2, Infinity],
      make: (args) => (x, y, t) => {
        let m = args[0](x, y, t);
        for (let k = 1; k < args.length; k++) m = Math.max(m, args[k](x, y, t));
        return m;
      },
    },
  ],
  [
    'clamp',
    {
      arity: [3, 3],
      make:
        ([a, lo, hi]) =>
        (x, y, t) =>
          Math.min(Math.max(a(x, y, t), lo(x, y, t)), hi(x, y, t)),
    },
  ],
  [
    // Only the chosen branch is evaluated, so if(lat > 0, log(lat), 0) is safe.
    'if',
    {
      arity: [3, 3],
      make:
        ([c, a, b]) =>
        (x, y, t) =>
          c(x, y, t) !== 0 ? a(x, y, t) : b(x, y, t),
    },
  ],
]);

const CONSTANTS = new Map<string, number>([
  ['pi', Math.PI],
  ['e', Math.E],
]);

const VARIABLES = new Map<string, Closure>([
  ['lon', (x) => x],
  ['lat', (_x, y) => y],
  ['t', (_x, _y, t) => t],
]);

const BINARY = new Map<string, (a: Closure, b: Closure) => Closure>([
  ['+', (a, b) => (x, y, t) => a(x, y, t) + b(x, y, t)],
  ['-', (a, b) => (x, y, t) => a(x, y, t) - b(x, y, t)],
  ['*', (a, b) => (x, y, t) => a(x, y, t) * b(x, y, t)],
  ['/', (a, b) => (x, y, t) => a(x, y, t) / b(x, y, t)],
  ['**', (a, b) => (x, y, t) => pm.pow(a(x, y, t), b(x, y, t))],
  ['<', (a, b) => (x, y, t) => (a(x, y, t) < b(x, y, t) ? 1 : 0)],
  ['<=', (a, b) => (x, y, t) => (a(x, y, t) <= b(x, y, t) ? 1 : 0)],
  ['>', (a, b) => (x, y, t) => (a(x, y, t) > b(x, y, t) ? 1 : 0)],
  ['>=', (a, b) => (x, y, t) => (a(x, y, t) >= b(x, y, t) ? 1 : 0)],
  ['==', (a, b) => (x, y, t) => (a(x, y, t) === b(x, y, t) ? 1 : 0)],
  ['!=', (a, b) => (x, y, t) => (a(x, y, t) !== b(x, y, t) ? 1 : 0)],
  ['&&', (a, b) => (x, y, t) => (a(x, y, t) !== 0 && b(x, y, t) !== 0 ? 1 : 0)],
  ['||', (a, b) => (x, y, t) => (a(x, y, t) !== 0 || b(x, y, t) !== 0 ? 1 : 0)],
]);

/**
 * Operators of one precedence, left-associative: a chain such as 1 + 2 - 3 + ... is one level
 * deep, however long, so the depth limit counts nesting, not terms (the length limit bounds the
 * chain; evaluating it nests one closure per term, well within any stack).
 */
const CHAIN_CLASS = new Map<string, number>([
  ['+', 1],
  ['-', 1],
  ['*', 2],
  ['/', 2],
  ['<', 3],
  ['<=', 3],
  ['>', 3],
  ['>=', 3],
  ['==', 4],
  ['!=', 4],
  ['&&', 5],
  ['||', 6],
]);

/** Words of JavaScript that a formula might borrow; none is part of the formula language. */
const JS_WORDS = new Set([
  'new',
  'typeof',
  'instanceof',
  'in',
  'return',
  'delete',
  'void',
  'function',
  'var',
  'let',
  'const',
  'class',
  'import',
  'export',
  'await',
  'async',
  'yield',
  'throw',
  'super',
  'with',
  'eval',
  'Function',
]);

/** Operators jsep knows that we refuse, with a hint where there is an obvious alternative. */
const BINARY_HINTS = new Map<string, string>([
  ['===', "use '=='"],
  ['!==', "use '!='"],
  ['%', 'there is no remainder operator'],
  ['&', "use '&&' for 'and'"],
  ['|', "use '||' for 'or'"],
]);

// Constant folding: subtrees without lon, lat or t are computed once at compile time, and an
// arithmetic operator with one constant side skips the call for it. Formulas in t are re-evaluated
// on every face at every update, so this matters.
const constantValue = new WeakMap<Closure, number>();
function constant(v: number): Closure {
  const f: Closure = () => v;
  constantValue.set(f, v);
  return f;
}
function folded(f: Closure, parts: Closure[]): Closure {
  return parts.every((p) => constantValue.has(p)) ? constant(f(0, 0, 0)) : f;
}
function arithmetic(op: string, a: Closure, b: Closure): Closure | null {
  const ca = constantValue.get(a);
  const cb = constantValue.get(b);
  if (cb !== undefined) {
    if (op === '+') return (x, y, t) => a(x, y, t) + cb;
    if (op === '-') return (x, y, t) => a(x, y, t) - cb;
    if (op === '*') return (x, y, t) => a(x, y, t) * cb;
    if (op === '/') return (x, y, t) => a(x, y, t) / cb;
    if (op === '**' && cb === 2)
      return (x, y, t) => {
        const v = a(x, y, t);
        return v * v;
      };
    if (op === '**') return (x, y, t) => pm.pow(a(x, y, t), cb);
  } else if (ca !== undefined) {
    if (op === '+') return (x, y, t) => ca + b(x, y, t);
    if (op === '-') return (x, y, t) => ca - b(x, y, t);
    if (op === '*') return (x, y, t) => ca * b(x, y, t);
    if (op === '/') return (x, y, t) => ca / b(x, y, t);
  }
  return null;
}

function describe(node: Expr): string {
  switch (node.type) {
    case 'MemberExpression':
      return "property access ('.' or '[ ]') is not allowed";
    case 'ThisExpression':
      return "'this' is not allowed";
    case 'ArrayExpression':
      return 'lists [ ... ] are not allowed';
    case 'SequenceExpression':
      return 'a formula must be a single expression (found several separated by commas or semicolons)';
    default:
      return `a ${node.type} is not allowed`;
  }
}

/** Parse and compile a formula once; throws FormulaError with the place of the first problem. */
export function compileFormula(source: string): CompiledFormula {
  if (typeof source !== 'string') throw new FormulaError('a formula must be a text string', -1);
  if (source.length > MAX_FORMULA_LENGTH) {
    throw new FormulaError(
      `formula too long: ${source.length} characters (at most ${MAX_FORMULA_LENGTH})`,
      MAX_FORMULA_LENGTH,
    );
  }
  let depth = 0;
  for (let k = 0; k < source.length; k++) {
    const c = source[k];
    if (c === '(' || c === '[') {
      depth++;
      if (depth > MAX_BRACKETS) {
        throw new FormulaError(`formula nested too deeply: more than ${MAX_BRACKETS} brackets at character ${k}`, k);
      }
    } else if (c === ')' || c === ']') depth--;
  }
  if (source.trim() === '') throw new FormulaError('the formula is empty', 0);

  const parser = new LocatingParser(source);
  let tree: Expr;
  try {
    tree = parser.parse();
  } catch (err) {
    if (err instanceof FormulaError) throw err;
    const e = err as { index?: unknown; description?: unknown; message?: unknown };
    if (typeof e.index === 'number') {
      let what = typeof e.description === 'string' ? e.description : String(e.message);
      // jsep names the power it was handed; the formula wrote '^' (e.g. "lat^^2").
      if (parser.lastWritten === '^' && what === 'Expected expression after **')
        what = "'^' must be followed by a number, a name or a bracket";
      throw new FormulaError(`syntax error at character ${e.index}: ${what}`, e.index);
    }
    throw new FormulaError(`syntax error: ${String(e.message ?? err)}`, -1);
  }

  const startOf = (node: Expr): number => {
    const s = parser.starts.get(node);
    if (s !== undefined) return s;
    // Binary and ternary nodes are built from their operands: they start where the left one does.
    const inner = (node.left ?? node.test ?? node.object ?? node.callee) as Expr | undefined;
    return inner ? startOf(inner) : -1;
  };
  const fail = (message: string, node: Expr): never => {
    const at = startOf(node);
    throw new FormulaError(at >= 0 ? `${message} at character ${at}` : message, at);
  };

  let usesTime = false;

  const build = (node: Expr, level: number): Closure => {
    if (level > MAX_FORMULA_DEPTH) fail(`formula nested too deeply (more than ${MAX_FORMULA_DEPTH} levels)`, node);
    switch (node.type) {
      case 'Literal': {
        const v = node.value;
        if (typeof v !== 'number') {
          const kind = typeof v === 'string' ? 'text strings are' : `'${String(node.raw)}' is`;
          return fail(`${kind} not allowed, only numbers`, node);
        }
        return constant(v);
      }
      case 'Identifier': {
        const name = node.name as string;
        const variable = VARIABLES.get(name);
        if (variable) {
          if (name === 't') usesTime = true;
          return variable;
        }
        const c = CONSTANTS.get(name);
        if (c !== undefined) return constant(c);
        if (FUNCTIONS.has(name)) return fail(`'${name}' is a function: write ${name}( ... )`, node);
        if (JS_WORDS.has(name))
          return fail(
            `unknown name '${name}' (a word of JavaScript; formulas know only numbers, lon, lat, t, pi, e, operators and the functions of docs/wind.md)`,
            node,
          );
        return fail(`unknown name '${name}'`, node);
      }
      case 'UnaryExpression': {
        const op = node.operator as string;
        const arg = build(node.argument as Expr, level + 1);
        if (op === '-') return folded((x, y, t) => -arg(x, y, t), [arg]);
        if (op === '+') return arg;
        if (op === '!') return folded((x, y, t) => (arg(x, y, t) === 0 ? 1 : 0), [arg]);
        return fail(`operator '${op}' is not allowed`, node);
      }
      case 'BinaryExpression': {
        const op = node.operator as string;
        const left = node.left as Expr;
        const right = node.right as Expr;
        // jsep binds a prefix minus tighter than any binary operator, so -x^2 arrives as (-x)^2.
        // In mathematics it means -(x^2): rebuild it that way unless the user wrote the parentheses.
        if (op === '**' && left.type === 'UnaryExpression' && !parser.grouped.has(left)) {
          const sign = left.operator as string;
          const inner: Expr = { type: 'BinaryExpression', operator: '**', left: left.argument as Expr, right };
          parser.starts.set(inner, startOf(left.argument as Expr));
          const unary: Expr = { type: 'UnaryExpression', operator: sign, argument: inner, prefix: true };
          parser.starts.set(unary, startOf(left));
          return build(unary, level);
        }
        const make = BINARY.get(op);
        if (!make) return fail(`operator '${op}' is not allowed`, left);
        // Along a chain of one precedence (a + b - c + ...) the left operand is no deeper.
        const chained =
          left.type === 'BinaryExpression' &&
          CHAIN_CLASS.get(op) !== undefined &&
          CHAIN_CLASS.get(left.operator as string) === CHAIN_CLASS.get(op);
        const a = build(left, chained ? level : level + 1);
        const b = build(right, level + 1);
        const general = make(a, b);
        if (constantValue.has(a) && constantValue.has(b)) return folded(general, [a, b]);
        return arithmetic(op, a, b) ?? general;
      }
      case 'ConditionalExpression': {
        const c = build(node.test as Expr, level + 1);
        const a = build(node.consequent as Expr, level + 1);
        const b = build(node.alternate as Expr, level + 1);
        return folded((x, y, t) => (c(x, y, t) !== 0 ? a(x, y, t) : b(x, y, t)), [c, a, b]);
      }
      case 'CallExpression': {
        const callee = node.callee as Expr;
        if (callee.type !== 'Identifier') {
          // Report what is wrong with the callee itself first (e.g. property access).
          build(callee, level + 1);
          return fail('only named functions can be called', node);
        }
        const name = callee.name as string;
        const entry = FUNCTIONS.get(name);
        if (!entry) {
          if (VARIABLES.has(name) || CONSTANTS.has(name)) return fail(`'${name}' is not a function`, node);
          return fail(`unknown function '${name}'`, node);
        }
        const args = node.arguments as Expr[];
        const [lo, hi] = entry.arity;
        if (args.length < lo || args.length > hi) {
          const want = lo === hi ? `${lo}` : hi === Infinity ? `at least ${lo}` : `${lo} to ${hi}`;
          return fail(`${name}() takes ${want} argument${lo === 1 && hi === 1 ? '' : 's'}, got ${args.length}`, node);
        }
        const built = args.map((a) => build(a, level + 1));
        return folded(entry.make(built), built);
      }
      case 'Compound': {
        // jsep reads "new Date()" or "lat lon" as several expressions side by side; say which
        // word or what is missing, and where, rather than that there are several.
        const body = node.body as Expr[];
        const second = startOf(body[1]);
        let before = second - 1;
        while (before >= 0 && /\s/.test(source[before])) before--;
        if (before >= 0 && (source[before] === ',' || source[before] === ';')) {
          throw new FormulaError(
            `a formula must be a single expression (found several separated by commas or semicolons) at character ${before}`,
            before,
          );
        }
        build(body[0], level + 1); // an unknown name or word first is the mistake
        throw new FormulaError(
          `an operator is missing before character ${second} (a formula is one expression: two values side by side need + - * / or ^ between them)`,
          second,
        );
      }
      default:
        return fail(describe(node), node);
    }
  };

  const evaluate = build(tree, 0);
  return { source, evaluate, usesTime };
}
