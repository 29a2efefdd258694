// Finding run-time code generation (eval, Function, string timers) in built JavaScript, and
// naming the original source of each place through the build's source map (Source Map v3: base64
// VLQ segments; decoded here, a few lines, rather than pulled from a dependency).

import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';

/** eval(...), new Function(...), Function(...), Function.apply/call(...), setTimeout/setInterval with a string. */
export const CODE_GENERATION =
  /\beval\s*\(|\bnew\s+Function\s*\(|(?<![\w$.])Function\s*(?:\.\s*(?:apply|call)\s*)?\(|\bset(?:Timeout|Interval)\s*\(\s*['"`]/g;

export interface Hit {
  file: string;
  line: number;
  column: number;
  text: string;
}

export function findCodeGeneration(file: string, text: string): Hit[] {
  const out: Hit[] = [];
  for (const m of text.matchAll(CODE_GENERATION)) {
    const before = text.slice(0, m.index);
    const line = before.split('\n').length;
    out.push({ file, line, column: m.index! - (before.lastIndexOf('\n') + 1), text: m[0] });
  }
  return out;
}

const B64 = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/';

function decodeSegment(seg: string): number[] {
  const values: number[] = [];
  let shift = 0;
  let value = 0;
  for (const ch of seg) {
    const digit = B64.indexOf(ch);
    if (digit < 0) throw new Error(`not a base64 VLQ digit: ${ch}`);
    value += (digit & 31) << shift;
    if (digit & 32) shift += 5;
    else {
      values.push(value & 1 ? -(value >>> 1) : value >>> 1);
      value = 0;
      shift = 0;
    }
  }
  return values;
}

export interface SourceMapV3 {
  sources: string[];
  mappings: string;
}

/** The original source file of a generated line (1-based) and column (0-based), or null. */
export function originalSource(map: SourceMapV3, line: number, column: number): string | null {
  let source = 0;
  const lines = map.mappings.split(';');
  let found: number | null = null;
  for (let l = 0; l < lines.length && l < line; l++) {
    let col = 0;
    for (const seg of lines[l].split(',')) {
      if (!seg) continue;
      const v = decodeSegment(seg);
      col += v[0];
      if (v.length >= 4) source += v[1];
      // The segment that starts at or before the column on the asked line.
      if (l === line - 1 && v.length >= 4 && col <= column) found = source;
    }
  }
  return found === null ? null : map.sources[found];
}

/** Every .js file of a built page, with its source map when there is one. */
export function builtScripts(outDir: string): Array<{ name: string; text: string; map: SourceMapV3 | null }> {
  const dir = join(outDir, 'assets');
  return readdirSync(dir)
    .filter((f) => f.endsWith('.js'))
    .map((name) => {
      let map: SourceMapV3 | null = null;
      try {
        map = JSON.parse(readFileSync(join(dir, `${name}.map`), 'utf8'));
      } catch {
        map = null;
      }
      return { name, text: readFileSync(join(dir, name), 'utf8'), map };
    });
}
