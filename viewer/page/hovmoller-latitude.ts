// Another Hovmoller latitude: the engine samples it from now on; the days before come from the
// kept frames.

import { latLabel } from '../render/geo.ts';
import { $ } from './dom.ts';
import type { DrawLoop } from './draw-loop.ts';
import type { Page } from './page.ts';

export async function addHovmollerLatitude(page: Page, drawing: DrawLoop): Promise<void> {
  const { state, engine, notices, history, hov, hovPanel } = page;
  const run = state.run;
  if (!run) return;
  const input = $<HTMLInputElement>('hov-lat-other');
  const lat = Number(input.value);
  if (input.value.trim() === '' || !Number.isFinite(lat)) {
    notices.message('Hovmoller latitude: type a latitude in degrees north, e.g. 4 or -3.5');
    return;
  }
  const r = await engine.addSection(lat);
  if (!r.ok) {
    notices.message(`Hovmoller latitude: ${r.message}`);
    return;
  }
  const g = run.grid;
  const j = Math.min(g.ny - 1, Math.max(0, Math.round((r.rowLat - g.latSouth) / g.dLat - 0.5)));
  const backfill: Array<{ day: number; values: Float32Array }> = [];
  for (let n = 0; n < history.length; n++) {
    const f = history.at(n);
    const h = f?.fields.h_anom;
    if (f && h) backfill.push({ day: f.day, values: h.slice(j * g.nx, (j + 1) * g.nx) });
  }
  if (r.index >= hov.lats.length || hov.at(r.index).length === 0) hov.addLatitude(r.index, r.rowLat, backfill);
  // Kept with the run, so that stop-and-reset shows it again (the engine keeps sampling it).
  if (r.index >= run.hovmollerLats.length) run.hovmollerLats.push(r.rowLat);
  const sel = $<HTMLSelectElement>('hov-lat');
  if (r.index >= sel.options.length) sel.add(new Option(latLabel(r.rowLat), String(r.index)));
  sel.value = String(r.index);
  hovPanel.setLatitude(r.index);
  if (backfill.length && history.at(0) && history.at(0)!.day > run.startDay! + 1e-9) {
    notices.message(
      `Hovmoller at ${latLabel(r.rowLat)}: days before ${history.at(0)!.day.toFixed(1)} were no longer kept, so the diagram starts there`,
      'info',
    );
  }
  drawing.queue(false);
}
