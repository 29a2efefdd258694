// Writes the verification table of docs/physics.md from the values the tests recorded
// (test-artifacts/verification.jsonl, written by record() in test/support/physics-kit.ts during
// `npm test`): one row per recorded check that names its outside source, with the test file that
// measured it. Run after `npm test`:   npm run verification   (then commit docs/physics.md).

import { readFileSync, writeFileSync } from 'node:fs';

export const RECORDS = 'test-artifacts/verification.jsonl';
export const DOC = 'docs/physics.md';
export const START =
  "<!-- verification table: written by npm run verification from the tests' records; do not edit by hand -->";
export const END = '<!-- end of the verification table -->';

export interface Recorded {
  check: string;
  measured: number | null;
  expected: number | null;
  unit: string;
  file: string;
  source?: string;
  tolerance?: string;
}

/** A number as the table shows it: four significant digits, small and large ones in e-notation. */
function show(x: number | null, unit: string): string {
  if (x === null || !Number.isFinite(x)) return '-';
  const a = Math.abs(x);
  const text = a !== 0 && (a < 1e-3 || a >= 1e6) ? x.toExponential(2) : String(Number(x.toPrecision(4)));
  return unit ? `${text} ${unit}` : text;
}

/** The records that belong in the table, the last of each check, in the order of first appearance. */
export function tableRecords(lines: readonly string[]): Recorded[] {
  const byCheck = new Map<string, Recorded>();
  for (const line of lines) {
    if (!line.trim()) continue;
    const r = JSON.parse(line) as Recorded;
    if (!r.source) continue;
    byCheck.delete(r.check);
    byCheck.set(r.check, r);
  }
  return [...byCheck.values()].sort((a, b) => a.file.localeCompare(b.file));
}

export function tableText(rows: readonly Recorded[]): string {
  const cell = (s: string) => s.replace(/\|/g, '\\|');
  const out = ['| Check | Source | Tolerance | Measured | Expected | Test |', '|---|---|---|---|---|---|'];
  for (const r of rows) {
    const dev =
      r.measured !== null &&
      r.expected !== null &&
      Number.isFinite(r.measured) &&
      Number.isFinite(r.expected) &&
      r.expected !== 0
        ? ` (${((100 * (r.measured - r.expected)) / Math.abs(r.expected)).toFixed(2)} %)`
        : '';
    out.push(
      `| ${cell(r.check)} | ${cell(r.source!)} | ${cell(r.tolerance ?? '')} | ${show(r.measured, r.unit)}${dev} | ${show(r.expected, r.unit)} | \`${r.file}\` |`,
    );
  }
  return out.join('\n');
}

/** docs/physics.md with the table between the markers replaced. */
export function withTable(doc: string, table: string): string {
  const a = doc.indexOf(START);
  const b = doc.indexOf(END);
  if (a < 0 || b < a) throw new Error(`${DOC} lacks the table markers`);
  return `${doc.slice(0, a + START.length)}\n${table}\n${doc.slice(b)}`;
}

if (process.argv[1]?.endsWith('verification-table.ts')) {
  const rows = tableRecords(readFileSync(RECORDS, 'utf8').split('\n'));
  writeFileSync(DOC, withTable(readFileSync(DOC, 'utf8'), tableText(rows)));
  console.log(`wrote ${rows.length} rows into ${DOC}`);
}
