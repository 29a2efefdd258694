// The read-out table: every field of the run at one cell of the frame on screen.

import type { LoadedScenario } from '../../worker/protocol.ts';
import { formatValue } from '../panels/colour-bar.ts';
import { latLabel, lonLabel } from '../render/geo.ts';
import { availableDisplays, displayAt } from '../state/display-fields.ts';
import type { KeptFrame } from '../state/frame-history.ts';
import type { Cell } from './state.ts';

export function showReadout(
  table: HTMLTableElement,
  run: LoadedScenario | null,
  f: KeptFrame | null,
  cell: Cell | null,
): void {
  if (!run || !f || !cell) {
    table.replaceChildren();
    return;
  }
  const g = run.grid;
  const k = cell.j * g.nx + cell.i;
  const rows: Array<[string, string]> = [
    ['Longitude', lonLabel(g.lon[cell.i])],
    ['Latitude', latLabel(g.lat[cell.j])],
    ['Day', f.day.toFixed(2)],
  ];
  if (!g.ocean[k]) rows.push(['', 'land']);
  else
    for (const d of availableDisplays(run.fields))
      rows.push([`${d.label}`, `${formatValue(displayAt(d.key, f.fields, run.physics.layerThickness, k))} ${d.units}`]);
  table.replaceChildren(
    ...rows.map(([a, b]) => {
      const tr = document.createElement('tr');
      const th = document.createElement('th');
      th.textContent = a;
      const td = document.createElement('td');
      td.textContent = b;
      tr.append(th, td);
      return tr;
    }),
  );
}
