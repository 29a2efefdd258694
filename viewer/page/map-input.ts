// The map takes the pointer (the read-out follows it), clicks (a cursor, or a probe in probe mode)
// and keys (arrows move the cursor, Enter or p puts a probe there).

import type { FieldName } from '../../model/diagnostics/fields.ts';
import { $, checkedValue } from './dom.ts';
import type { DrawLoop } from './draw-loop.ts';
import type { Page } from './page.ts';
import type { Cell } from './state.ts';

export function wireMapInput(page: Page, drawing: DrawLoop): void {
  const { state, map } = page;
  const canvas = $<HTMLCanvasElement>('map-gl');
  canvas.addEventListener('pointermove', (ev) => {
    state.hover = map.cellAtPixel(ev.offsetX, ev.offsetY);
    drawing.showReadout();
  });
  canvas.addEventListener('pointerleave', () => {
    state.hover = null;
    drawing.showReadout();
  });
  canvas.addEventListener('click', (ev) => {
    const c = map.cellAtPixel(ev.offsetX, ev.offsetY);
    if (!c) return;
    state.cursor = c;
    if (checkedValue('click-mode', '') === 'probe') addProbeAt(page, c);
    drawing.queue(true);
  });
  canvas.addEventListener('keydown', (ev) => {
    if (!state.run) return;
    const g = state.run.grid;
    const c = state.cursor ?? { i: Math.floor(g.nx / 2), j: Math.floor(g.ny / 2) };
    const step = ev.shiftKey ? 5 : 1;
    const moves: Record<string, [number, number]> = { ArrowLeft: [-step, 0], ArrowRight: [step, 0], ArrowUp: [0, step], ArrowDown: [0, -step] };
    if (moves[ev.key]) {
      const [di, dj] = moves[ev.key];
      state.cursor = { i: Math.min(g.nx - 1, Math.max(0, c.i + di)), j: Math.min(g.ny - 1, Math.max(0, c.j + dj)) };
      ev.preventDefault();
      drawing.queue(false);
    } else if (ev.key === 'Enter' || ev.key === 'p') {
      state.cursor = c;
      addProbeAt(page, c);
      ev.preventDefault();
      drawing.queue(true);
    }
  });
}

/** A probe of the page at a cell, its series started from the frames still kept, oldest first. */
function addProbeAt(page: Page, c: Cell): void {
  const { state, probes, history, probePanel, notices } = page;
  const run = state.run;
  if (!run) return;
  const g = run.grid;
  const k = c.j * g.nx + c.i;
  if (!g.ocean[k]) {
    notices.message('A probe must sit over the ocean; that cell is land.', 'info');
    return;
  }
  probes.addPageProbe(g.lon[c.i], g.lat[c.j], k);
  const p = probes.probes[probes.probes.length - 1];
  for (let n = 0; n < history.length; n++) {
    const f = history.at(n)!;
    p.days.push(f.day);
    for (const name of run.fields as FieldName[]) p.values[name]!.push(f.fields[name] ? f.fields[name]![k] : NaN);
  }
  probePanel.renderList();
}
