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

/** Read a scenario file's text; syntax errors come back as "file.json: line 3, column 7: ..." issues. */
export function parseScenarioText(text: string, fileName?: string): ParseResult {
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
    if (this.i >= this.s.length) throw new JsonSyntaxError('the file is empty; a scenario is a JSON object { ... }', this.i);
    const v = this.value([]);
    this.space();
    if (this.i < this.s.length) throw new JsonSyntaxError(`unexpected ${this.describe()} after the end of the JSON value`, this.i);
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

  private value(path: PathSegment[]): unknown {
    this.space();
    const start = this.i;
    const key = pathToString(path);
    if (!this.locations.has(key)) this.locations.set(key, this.position(start));
    const ch = this.s[this.i];
    if (ch === '{') return this.object(path);
    if (ch === '[') return this.array(path);
    if (ch === '"') return this.string();
    if (ch === '-' || (ch >= '0' && ch <= '9')) return this.number();
    for (const [word, v] of [['true', true], ['false', false], ['null', null]] as const) {
      if (this.s.startsWith(word, this.i)) {
        this.i += word.length;
        return v;
      }
    }
    if (ch === "'") throw new JsonSyntaxError("strings must use double quotes \" in JSON, not single quotes '", this.i);
    if (this.i >= this.s.length) throw new JsonSyntaxError('unexpected end of file: a value is missing', this.i);
    const word = /^[A-Za-z_][A-Za-z0-9_]*/.exec(this.s.slice(this.i, this.i + 40));
    if (word) throw new JsonSyntaxError(`unexpected word '${word[0]}': expected a value (a number, a "string", true, false, null, { or [)`, this.i);
    throw new JsonSyntaxError(`unexpected ${this.describe()}: expected a value`, this.i);
  }

  private object(path: PathSegment[]): Record<string, unknown> {
    const open = this.i;
    this.i++;
    const out: Record<string, unknown> = {};
    const seen = new Map<string, number>();
    this.space();
    if (this.s[this.i] === '}') {
      this.i++;
      return out;
    }
    for (;;) {
      this.space();
      if (this.s[this.i] !== '"') {
        if (this.i >= this.s.length) throw new JsonSyntaxError(`unexpected end of file: the object opened at line ${this.position(open).line} is not closed with }`, this.i);
        if (this.s[this.i] === '}') throw new JsonSyntaxError('trailing comma before }: remove the last comma', this.i);
        throw new JsonSyntaxError(`unexpected ${this.describe()}: expected a key in double quotes`, this.i);
      }
      const keyAt = this.i;
      const key = this.string();
      if (seen.has(key)) {
        throw new JsonSyntaxError(`duplicate key "${key}" (first at line ${this.position(seen.get(key)!).line})`, keyAt);
      }
      seen.set(key, keyAt);
      this.locations.set(pathToString([...path, key]), this.position(keyAt));
      this.space();
      if (this.s[this.i] !== ':') throw new JsonSyntaxError(`unexpected ${this.describe()}: expected : after the key "${key}"`, this.i);
      this.i++;
      // Keys such as "__proto__" must become plain properties, not change the prototype.
      Object.defineProperty(out, key, { value: this.value([...path, key]), enumerable: true, writable: true, configurable: true });
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
      if (this.i >= this.s.length) throw new JsonSyntaxError(`unexpected end of file: the object opened at line ${this.position(open).line} is not closed with }`, this.i);
      throw new JsonSyntaxError(`unexpected ${this.describe()}: expected , or } after the value of "${key}"`, this.i);
    }
  }

  private array(path: PathSegment[]): unknown[] {
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
      out.push(this.value([...path, out.length]));
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
      if (this.i >= this.s.length) throw new JsonSyntaxError(`unexpected end of file: the list opened at line ${this.position(open).line} is not closed with ]`, this.i);
      throw new JsonSyntaxError(`unexpected ${this.describe()}: expected , or ] in the list`, this.i);
    }
  }

  private string(): string {
    const open = this.i;
    this.i++;
    let out = '';
    for (;;) {
      const ch = this.s[this.i];
      if (ch === undefined || ch === '\n') throw new JsonSyntaxError('unterminated string: a closing " is missing', open);
      if (ch === '"') {
        this.i++;
        return out;
      }
      if (ch < ' ') throw new JsonSyntaxError('control character inside a string; write it as an escape such as \\t', this.i);
      if (ch === '\\') {
        const e = this.s[this.i + 1];
        const simple: Record<string, string> = { '"': '"', '\\': '\\', '/': '/', b: '\b', f: '\f', n: '\n', r: '\r', t: '\t' };
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
    const m = /^-?(0|[1-9][0-9]*)(\.[0-9]+)?([eE][+-]?[0-9]+)?/.exec(this.s.slice(this.i, this.i + 400));
    if (!m) throw new JsonSyntaxError(`bad number: ${this.describe()} cannot start a number here`, this.i);
    const after = this.s[this.i + m[0].length];
    if (after !== undefined && /[0-9.eE+\-A-Za-z]/.test(after)) {
      throw new JsonSyntaxError(`bad number '${this.s.slice(this.i, this.i + m[0].length + 1)}' (JSON numbers have no leading zeros, hex, or trailing dots)`, this.i);
    }
    this.i += m[0].length;
    const v = Number(m[0]);
    if (!Number.isFinite(v)) throw new JsonSyntaxError(`number ${m[0]} is too large`, this.i - m[0].length);
    return v;
  }
}
