// The page's controls: run, pause, step, speed, reset, apply and revert of the scenario panel, the
// field and range pickers, the Hovmoller latitude, the time slider and its memory budget.

import type { DisplayKey } from '../state/display-fields.ts';
import { $ } from './dom.ts';
import type { DrawLoop } from './draw-loop.ts';
import { addHovmollerLatitude } from './hovmoller-latitude.ts';
import type { Page } from './page.ts';
import type { RunLifecycle } from './run-lifecycle.ts';

export function wireControls(page: Page, runs: RunLifecycle, drawing: DrawLoop, layoutMap: () => void): void {
  const { state, engine, panel, notices, probePanel, hovPanel, history } = page;
  const redraw = () => drawing.queue(false);

  // ---- the run ----
  $('btn-run').addEventListener('click', () => {
    state.viewIndex = null;
    void engine.start();
  });
  $('btn-pause').addEventListener('click', () => void engine.pause());
  $('btn-step').addEventListener('click', () => {
    state.viewIndex = null;
    void engine.stepOutput();
  });
  $<HTMLSelectElement>('speed').addEventListener('change', (ev) => {
    const v = (ev.target as HTMLSelectElement).value;
    void engine.setSpeed(v === 'max' ? 'max' : Number(v));
  });
  $('btn-reset').addEventListener('click', () => void runs.reset());
  // Apply and run: the edited values from day 0, and the run goes at once.
  $('btn-apply').addEventListener('click', async () => {
    if (!panel.lastCheck.valid) return;
    notices.clear();
    if (await runs.load(panel.text(), panel.fileName)) {
      panel.commit();
      state.viewIndex = null;
      void engine.start();
    }
  });
  $('btn-revert').addEventListener('click', () => panel.revert());

  // ---- what the map shows ----
  $<HTMLSelectElement>('field-pick').addEventListener('change', (ev) => {
    state.fieldKey = (ev.target as HTMLSelectElement).value as DisplayKey;
    drawing.rescanRange();
    redraw();
  });
  $<HTMLSelectElement>('probe-field').addEventListener('change', (ev) => {
    probePanel.key = (ev.target as HTMLSelectElement).value as DisplayKey;
    drawing.queue(true);
  });
  for (const id of [
    'show-currents',
    'show-wind',
    'range-min',
    'range-max',
    'arrow-ref-current',
    'arrow-ref-wind',
    'arrow-density',
  ])
    $(id).addEventListener('input', redraw);
  for (const r of document.querySelectorAll('input[name="range-mode"]')) {
    r.addEventListener('change', () => {
      drawing.rescanRange();
      redraw();
    });
  }

  // ---- the Hovmoller diagram ----
  $('btn-hov-lat').addEventListener('click', () => void addHovmollerLatitude(page, drawing));
  $<HTMLInputElement>('hov-lat-other').addEventListener('keydown', (ev) => {
    if (ev.key === 'Enter') void addHovmollerLatitude(page, drawing);
  });
  $<HTMLSelectElement>('hov-lat').addEventListener('change', (ev) => {
    hovPanel.setLatitude(Number((ev.target as HTMLSelectElement).value));
    redraw();
  });

  // ---- looking back in time ----
  $<HTMLInputElement>('time-slider').addEventListener('input', (ev) => {
    const i = Number((ev.target as HTMLInputElement).value);
    state.viewIndex = i >= history.length - 1 ? null : i;
    redraw();
  });
  $('btn-latest').addEventListener('click', () => {
    state.viewIndex = null;
    redraw();
  });
  $<HTMLSelectElement>('budget').addEventListener('change', (ev) => {
    history.setBudget(Number((ev.target as HTMLSelectElement).value) * 1e6);
    if (state.viewIndex !== null && state.viewIndex >= history.length) state.viewIndex = null;
    redraw();
  });
  window.addEventListener('resize', () => {
    layoutMap();
    drawing.queue(true);
  });

  // ---- the scenario drawer ----
  const layout = $('app');
  const toggle = $<HTMLButtonElement>('btn-scenario');
  const setDrawer = (open: boolean) => {
    layout.classList.toggle('scenario-open', open);
    toggle.setAttribute('aria-expanded', String(open));
    layoutMap();
    drawing.queue(true);
  };
  // Open on a wide screen, where the map and the diagrams still fit beside it; closed on a narrow one.
  setDrawer(window.innerWidth >= 1200);
  toggle.addEventListener('click', () => setDrawer(!layout.classList.contains('scenario-open')));
  $('btn-scenario-close').addEventListener('click', () => setDrawer(false));
}
