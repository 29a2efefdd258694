// Model and engine code computes elementary functions with model/portable-math.ts only: the host's
// Math.exp, Math.sin, ... (and the ** operator, which calls the host's pow) differ between Node and
// Chromium in the last bit, so one use on a result path breaks cross-host reproducibility
// (test/browser/reproducible.test.ts). Viewer display code may use Math; it is not scanned.

import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const HOST_MATH =
  /\bMath\.(exp|expm1|log|log1p|log2|log10|pow|sin|cos|tan|asin|acos|atan|atan2|sinh|cosh|tanh|asinh|acosh|atanh|cbrt|hypot)\b/;

function sources(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const path = join(dir, name);
    if (statSync(path).isDirectory()) out.push(...sources(path));
    else if (name.endsWith('.ts') && !name.endsWith('.as.ts') && !name.endsWith('.d.ts')) out.push(path);
  }
  return out;
}

/** Code without comments and string contents (good enough for our sources: no regex literals with quotes). */
function codeOnly(text: string): string[] {
  return text
    .replace(/\/\*[\s\S]*?\*\//g, (m) => m.replace(/[^\n]/g, ' '))
    .split('\n')
    .map((line) => line.replace(/\/\/.*$/, '').replace(/'(?:[^'\\]|\\.)*'|`(?:[^`\\]|\\.)*`|"(?:[^"\\]|\\.)*"/g, "''"));
}

describe('model and engine code uses the portable elementary functions', () => {
  const files = [...sources(join(ROOT, 'model')), ...sources(join(ROOT, 'worker'))];
  it('scans the model and worker sources', () => {
    expect(files.length).toBeGreaterThan(50);
  });
  it('no Math.<transcendental> and no ** on computed values', () => {
    const found: string[] = [];
    for (const file of files) {
      codeOnly(readFileSync(file, 'utf8')).forEach((line, i) => {
        if (HOST_MATH.test(line)) found.push(`${relative(ROOT, file)}:${i + 1}: ${line.trim()}`);
        for (const m of line.matchAll(/(\S+)\s*\*\*\s*(\S+)/g)) {
          if (!/^\(?\d+(\.\d+)?$/.test(m[1]) || !/^\d/.test(m[2]))
            found.push(`${relative(ROOT, file)}:${i + 1}: ${line.trim()}`);
        }
      });
    }
    expect(found).toEqual([]);
  });
  it('the check itself finds a host call and a ** on a variable', () => {
    const lines = codeOnly('const a = Math.exp(x); // Math.sin in a comment\nconst b = x ** 2;\nconst c = 2 ** 32;');
    expect(HOST_MATH.test(lines[0])).toBe(true);
    expect(lines[0]).not.toMatch(/sin/);
    expect([...lines[1].matchAll(/(\S+)\s*\*\*\s*(\S+)/g)].length).toBe(1);
    expect(/^\(?\d+(\.\d+)?$/.test('2')).toBe(true);
  });
});
