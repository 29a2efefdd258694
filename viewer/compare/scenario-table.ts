// The table of scenario differences (which parameters and wind parts differ), A against B.

import { showValue, type ScenarioDifference } from '../../model/compare/scenario-diff.ts';

export interface DifferenceRow {
  path: string;
  part: string;
  a: string;
  b: string;
}

/** Rows for the table; the run names and descriptions are left out (they always differ or say nothing). */
export function differenceRows(diffs: readonly ScenarioDifference[]): DifferenceRow[] {
  return diffs
    .filter((d) => d.path !== 'name' && d.path !== 'description')
    .map((d) => ({ path: d.path, part: d.part ?? '', a: showValue(d.a), b: showValue(d.b) }));
}

export function differenceTable(rows: DifferenceRow[]): HTMLTableElement {
  const t = document.createElement('table');
  t.className = 'cmp-table';
  t.id = 'cmp-scenario-table';
  const head = document.createElement('tr');
  for (const h of ['scenario value', 'wind part', 'A', 'B'])
    head.append(Object.assign(document.createElement('th'), { textContent: h }));
  t.append(head);
  if (rows.length === 0) {
    const tr = document.createElement('tr');
    tr.append(
      Object.assign(document.createElement('td'), { textContent: 'the two scenarios are the same', colSpan: 4 }),
    );
    t.append(tr);
  }
  for (const r of rows) {
    const tr = document.createElement('tr');
    tr.dataset.path = r.path;
    for (const v of [r.path, r.part, r.a, r.b])
      tr.append(Object.assign(document.createElement('td'), { textContent: v }));
    t.append(tr);
  }
  return t;
}
