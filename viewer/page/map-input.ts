// The map takes the pointer (the read-out follows it), clicks (a cursor, or a probe in probe mode)
// and keys (arrows move the cursor, Enter or p puts a probe there).

import { $, checkedValue } from './dom.ts';
import type { DrawLoop } from './draw-loop.ts';
import type { Page } from './page.ts';
import type { Cell } from './state.ts';
import type { KeptFrame } from '../state/frame-history.ts';

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
    const moves: Record<string, [number, number]> = {
      ArrowLeft: [-step, 0],
      ArrowRight: [step, 0],
      ArrowUp: [0, step],
      ArrowDown: [0, -step],
    };
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

/**
 * A probe of the page at a cell. Its series before now comes from the maps the page keeps of the
 * run (every output record while they fit in memory, else every k-th), or, failing those, from
 * the frames kept for looking back; the probe list says which days it got.
 */
function addProbeAt(page: Page, c: Cell): void {
  const { state, probes, history, probePanel, notices, library } = page;
  const run = state.run;
  if (!run) return;
  const g = run.grid;
  const k = c.j * g.nx + c.i;
  if (!g.ocean[k]) {
    notices.message('A probe must sit over the ocean; that cell is land.', 'info');
    return;
  }
  const p = probes.addPageProbe(g.lon[c.i], g.lat[c.j], k);
  const kept = library.keptMaps();
  const per = run.outputEveryDays ?? 1;
  if (kept.days.length > 0) {
    probes.fillPageProbe(p, kept.days, kept.maps as Array<KeptFrame['fields']>);
    const every =
      kept.every > 1
        ? `the page's maps, one every ${+(kept.every * per).toFixed(3)} days`
        : 'the page\u2019s maps of every output';
    p.note = `days ${dayText(kept.days[0])} to ${dayText(kept.days[kept.days.length - 1])} from ${every}, then as the run goes`;
  } else {
    const days: number[] = [];
    const maps: Array<KeptFrame['fields']> = [];
    for (let n = 0; n < history.length; n++) {
      days.push(history.at(n)!.day);
      maps.push(history.at(n)!.fields);
    }
    probes.fillPageProbe(p, days, maps);
    p.note = days.length
      ? `days ${dayText(days[0])} to ${dayText(days[days.length - 1])} from the frames kept for looking back`
      : 'from now on';
  }
  probePanel.renderList();
}

const dayText = (d: number) => String(+d.toFixed(2));
