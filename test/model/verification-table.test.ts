// docs/physics.md's verification table is the tests' own: written by `npm run verification` from
// what record() kept, each row naming the test file that measured it. A row that names no test,
// or a test that records a table value but has no row, fails here (regenerate the table).

import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { DOC, END, START } from '../support/verification-table.ts';

function testFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
    e.isDirectory() ? testFiles(join(dir, e.name)) : e.name.endsWith('.test.ts') ? [join(dir, e.name)] : [],
  );
}

describe('the verification table of docs/physics.md', () => {
  const doc = readFileSync(DOC, 'utf8');
  const body = doc.slice(doc.indexOf(START) + START.length, doc.indexOf(END));
  const rows = body.split('\n').filter((l) => l.startsWith('| ') && !l.startsWith('| Check |'));

  it('has its rows between the markers, each with a source and a test file that records it', () => {
    expect(doc.indexOf(START)).toBeGreaterThan(0);
    expect(rows.length).toBeGreaterThan(40);
    for (const row of rows) {
      const cells = row.split(/(?<!\\)\|/).map((c) => c.trim());
      const file = /`([^`]+)`/.exec(cells[6] ?? '')?.[1] ?? '';
      expect(cells[2], row).not.toBe('');
      expect(existsSync(file), `${file} (row: ${cells[1]})`).toBe(true);
      expect(readFileSync(file, 'utf8'), file).toMatch(/record\(/);
    }
  });

  it('has a row from every test that records a table value', () => {
    const inTable = new Set(rows.map((r) => /`([^`]+)`\s*\|\s*$/.exec(r)?.[1]));
    // A record with a table row passes { source, tolerance }, on one line or spread over several.
    const recording = testFiles('test').filter((f) => /record\([^;]*\{\s*source:/s.test(readFileSync(f, 'utf8')));
    expect(recording.length).toBeGreaterThan(8);
    expect(recording.filter((f) => !inTable.has(f))).toEqual([]);
  });
});
