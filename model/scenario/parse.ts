// A strict JSON reader that remembers where every value sits in the text, so that messages can name
// the line and column of a mistake. JSON.parse cannot: its messages differ between engines and
// often give no position at all. Duplicate keys are refused (JSON.parse silently keeps the last).

import { pathToString, type PathSegment, type ScenarioIssue } from './errors.ts';

export interface TextPosition {
  line: number;
  column: number;
}

export type ParseResult =
  | { ok: true; json: unknown; locations: Map<string, TextPosition> }
  | { ok: false; errors: ScenarioIssue[] };

class JsonSyntaxError extends Error {
  constructor(
    message: string,
    readonly offset: number,
  ) {
    super(message);
  }
}

/**
 * Largest scenario text, characters. A scenario with a large painted grid is a few MB; the bound
 * keeps a hostile file from tying up the page or the command line for minutes.
 */
export const MAX_SCENARIO_CHARS = 16 * 1024 * 1024;
/** Deepest nesting of { and [. A scenario needs about 8; the bound keeps every recursive walk safe. */
export const MAX_NESTING = 64;
/**
 * Array items after this many, and any value after this many positions in all, get no text
 * position of their own (messages then name the line of the nearest ancestor that has one). A
 * scenario has a few hundred values worth pointing at; a Map of millions of paths costs seconds.
 */
const LOCATED_ITEMS = 1000;
const MAX_LOCATIONS = 20_000;

/** Read a scenario file's text; syntax errors come back as "file.json: line 3, column 7: ..." issues. */
export function parseScenarioText(text: string, fileName?: string): ParseResult {
  if (text.length > MAX_SCENARIO_CHARS) {
    const issue: ScenarioIssue = {
      path: '',
      message: `the file is ${(text.length / 1048576).toFixed(1)} M characters long; a scenario file is at most ${MAX_SCENARIO_CHARS / 1048576} M (put large wind data in a CSV or NetCDF wind file)`,
    };
    if (fileName) issue.file = fileName;
    return { ok: false, errors: [issue] };
  }
  const src = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const reader = new Reader(src);
  try {
    const json = reader.document();
    return { ok: true, json, locations: reader.locations };
  } catch (e) {
    if (!(e instanceof JsonSyntaxError)) throw e;
    const { line, column } = reader.position(e.offset);
    const issue: ScenarioIssue = { path: '', message: e.message, line, column };
    if (fileName) issue.file = fileName;
    return { ok: false, errors: [issue] };
  }
}

/** A JSON number, matched in place (sticky) so no substring is made per number. */
const NUMBER = /-?(0|[1-9][0-9]*)(\.[0-9]+)?([eE][+-]?[0-9]+)?/y;

/**
 * A number written as JSON writes it (decimal, no hex, no leading zeros or '+', no Infinity),
 * the one rule for numbers in scenario files and on the command line (--days, --threads, --jobs);
 * null for anything else, a finite number otherwise.
 */
export function readJsonNumber(text: string): number | null {
  const t = text.trim();
  NUMBER.lastIndex = 0;
  const m = NUMBER.exec(t);
  if (!m || m[0].length !== t.length) return null;
  const v = Number(t);
  return Number.isFinite(v) ? v : null;
}

class Reader {
  private i = 0;
  readonly locations = new Map<string, TextPosition>();
  private readonly lineStarts: number[] = [0];

  constructor(private readonly s: string) {
    for (let k = 0; k < s.length; k++) if (s[k] === '\n') this.lineStarts.push(k + 1);
  }

  position(offset: number): TextPosition {
    let lo = 0;
    let hi = this.lineStarts.length - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (this.lineStarts[mid] <= offset) lo = mid;
      else hi = mid - 1;
    }
    return { line: lo + 1, column: offset - this.lineStarts[lo] + 1 };
  }

  document(): unknown {
    this.space();
    if (this.i >= this.s.length)
      throw new JsonSyntaxError('the file is empty; a scenario is a JSON object { ... }', this.i);
    const v = this.value([], 0);
    this.space();
    if (this.i < this.s.length)
      throw new JsonSyntaxError(`unexpected ${this.describe()} after the end of the JSON value`, this.i);
    return v;
  }

  private describe(): string {
    if (this.i >= this.s.length) return 'end of file';
    const ch = this.s[this.i];
    return `character ${JSON.stringify(ch)}`;
  }

  private space(): void {
    for (;;) {
      const ch = this.s[this.i];
      if (ch === ' ' || ch === '\t' || ch === '\n' || ch === '\r') this.i++;
      else if (ch === '/' && (this.s[this.i + 1] === '/' || this.s[this.i + 1] === '*')) {
        throw new JsonSyntaxError('comments are not allowed in JSON; put notes in "description"', this.i);
      } else return;
    }
  }

  /**
   * One value. `path` is null for values that get no text position (past the location limits):
   * their whole subtree is then read without building paths, which keeps huge arrays cheap.
   */
  private value(path: PathSegment[] | null, depth: number): unknown {
    this.space();
    const start = this.i;
    if (path && this.locations.size < MAX_LOCATIONS) {
      const key = pathToString(path);
      if (!this.locations.has(key)) this.locations.set(key, this.position(start));
    }
    const ch = this.s[this.i];
    if ((ch === '{' || ch === '[') && depth >= MAX_NESTING) {
      throw new JsonSyntaxError(
        `nesting deeper than ${MAX_NESTING} levels of { and [; a scenario needs only a few`,
        this.i,
      );
    }
    if (ch === '{') return this.object(path, depth + 1);
    if (ch === '[') return this.array(path, depth + 1);
    if (ch === '"') return this.string();
    if (ch === '-' || (ch >= '0' && ch <= '9')) return this.number();
    for (const [word, v] of [
      ['true', true],
      ['false', false],
      ['null', null],
    ] as const) {
      if (this.s.startsWith(word, this.i)) {
        this.i += word.length;
        return v;
      }
    }
    if (ch === "'") throw new JsonSyntaxError('strings must use double quotes " in JSON, not single quotes \'', this.i);
    if (this.i >= this.s.length) throw new JsonSyntaxError('unexpected end of file: a value is missing', this.i);
    const word = /^[A-Za-z_][A-Za-z0-9_]*/.exec(this.s.slice(this.i, this.i + 40));
    if (word)
      throw new JsonSyntaxError(
        `unexpected word '${word[0]}': expected a value (a number, a "string", true, false, null, { or [)`,
        this.i,
      );
    throw new JsonSyntaxError(`unexpected ${this.describe()}: expected a value`, this.i);
  }

  private object(path: PathSegment[] | null, depth: number): Record<string, unknown> {
    const open = this.i;
    this.i++;
    const out: Record<string, unknown> = {};
    this.space();
    if (this.s[this.i] === '}') {
      this.i++;
      return out;
    }
    const located = path !== null && this.locations.size < MAX_LOCATIONS;
    for (;;) {
      this.space();
      if (this.s[this.i] !== '"') {
        if (this.i >= this.s.length)
          throw new JsonSyntaxError(
            `unexpected end of file: the object opened at line ${this.position(open).line} is not closed with }`,
            this.i,
          );
        if (this.s[this.i] === '}') throw new JsonSyntaxError('trailing comma before }: remove the last comma', this.i);
        throw new JsonSyntaxError(`unexpected ${this.describe()}: expected a key in double quotes`, this.i);
      }
      const keyAt = this.i;
      const key = this.string();
      if (Object.hasOwn(out, key)) {
        const first = located ? this.locations.get(pathToString([...path!, key])) : undefined;
        throw new JsonSyntaxError(`duplicate key "${key}"${first ? ` (first at line ${first.line})` : ''}`, keyAt);
      }
      const child = located ? [...path!, key] : null;
      if (child && this.locations.size < MAX_LOCATIONS) this.locations.set(pathToString(child), this.position(keyAt));
      this.space();
      if (this.s[this.i] !== ':')
        throw new JsonSyntaxError(`unexpected ${this.describe()}: expected : after the key "${key}"`, this.i);
      this.i++;
      // Keys such as "__proto__" must become plain properties, not change the prototype.
      Object.defineProperty(out, key, {
        value: this.value(child, depth),
        enumerable: true,
        writable: true,
        configurable: true,
      });
      this.space();
      const ch = this.s[this.i];
      if (ch === ',') {
        this.i++;
        continue;
      }
      if (ch === '}') {
        this.i++;
        return out;
      }
      if (this.i >= this.s.length)
        throw new JsonSyntaxError(
          `unexpected end of file: the object opened at line ${this.position(open).line} is not closed with }`,
          this.i,
        );
      throw new JsonSyntaxError(`unexpected ${this.describe()}: expected , or } after the value of "${key}"`, this.i);
    }
  }

  private array(path: PathSegment[] | null, depth: number): unknown[] {
    const open = this.i;
    this.i++;
    const out: unknown[] = [];
    this.space();
    if (this.s[this.i] === ']') {
      this.i++;
      return out;
    }
    for (;;) {
      this.space();
      if (this.s[this.i] === ']') throw new JsonSyntaxError('trailing comma before ]: remove the last comma', this.i);
      const located = path !== null && out.length < LOCATED_ITEMS && this.locations.size < MAX_LOCATIONS;
      out.push(this.value(located ? [...path!, out.length] : null, depth));
      this.space();
      const ch = this.s[this.i];
      if (ch === ',') {
        this.i++;
        continue;
      }
      if (ch === ']') {
        this.i++;
        return out;
      }
      if (this.i >= this.s.length)
        throw new JsonSyntaxError(
          `unexpected end of file: the list opened at line ${this.position(open).line} is not closed with ]`,
          this.i,
        );
      throw new JsonSyntaxError(`unexpected ${this.describe()}: expected , or ] in the list`, this.i);
    }
  }

  private string(): string {
    const open = this.i;
    this.i++;
    let out = '';
    for (;;) {
      // Copy a run of plain characters at once: long strings cost one slice, not one concatenation per character.
      const run = this.i;
      while (this.i < this.s.length) {
        const c = this.s.charCodeAt(this.i);
        if (c === 0x22 || c === 0x5c || c < 0x20) break;
        this.i++;
      }
      if (this.i > run) out += this.s.slice(run, this.i);
      const ch = this.s[this.i];
      if (ch === undefined || ch === '\n')
        throw new JsonSyntaxError('unterminated string: a closing " is missing', open);
      if (ch === '"') {
        this.i++;
        return out;
      }
      if (ch < ' ')
        throw new JsonSyntaxError('control character inside a string; write it as an escape such as \\t', this.i);
      if (ch === '\\') {
        const e = this.s[this.i + 1];
        const simple: Record<string, string> = {
          '"': '"',
          '\\': '\\',
          '/': '/',
          b: '\b',
          f: '\f',
          n: '\n',
          r: '\r',
          t: '\t',
        };
        if (e !== undefined && e in simple) {
          out += simple[e];
          this.i += 2;
        } else if (e === 'u' && /^[0-9a-fA-F]{4}$/.test(this.s.slice(this.i + 2, this.i + 6))) {
          out += String.fromCharCode(parseInt(this.s.slice(this.i + 2, this.i + 6), 16));
          this.i += 6;
        } else {
          throw new JsonSyntaxError(`bad escape \\${e ?? ''} in a string`, this.i);
        }
        continue;
      }
      out += ch;
      this.i++;
    }
  }

  private number(): number {
    NUMBER.lastIndex = this.i;
    const m = NUMBER.exec(this.s);
    if (!m) throw new JsonSyntaxError(`bad number: ${this.describe()} cannot start a number here`, this.i);
    const after = this.s[this.i + m[0].length];
    if (after !== undefined && /[0-9.eE+\-A-Za-z]/.test(after)) {
      throw new JsonSyntaxError(
        `bad number '${this.s.slice(this.i, this.i + m[0].length + 1)}' (JSON numbers have no leading zeros, hex, or trailing dots)`,
        this.i,
      );
    }
    this.i += m[0].length;
    const v = Number(m[0]);
    if (!Number.isFinite(v)) throw new JsonSyntaxError(`number ${m[0]} is too large`, this.i - m[0].length);
    return v;
  }
}
