// The editor of one wind part: its pattern, envelope and amplitude fields with units and the
// schema's ranges, each with the validator's message under it, and the envelope's time plot.
// Typing updates the design without rebuilding the editor (focus and caret stay where they are);
// a change of kind rebuilds it.

import { placeLabel } from '../../model/display/coordinates.ts';
import type { BandProfile, EnvelopeSpec, ShapeSpec, WindPart } from '../../model/forcing/spec.ts';
import type { ScenarioIssue } from '../../model/scenario/errors.ts';
import { getAt, patternOf, setAt, type BasinBox } from './design.ts';
import { dayAxis, drawTimePlot, partSeries } from './envelope-plot.ts';
import {
  defaultEnvelope,
  defaultProfile,
  defaultShape,
  describe,
  ENVELOPE_KINDS,
  fieldsOf,
  parseTable,
  PROFILE_KINDS,
  rangeHint,
  readNumber,
  SHAPE_KINDS,
  showValue,
  tableText,
} from './fields.ts';
import { formulaInput } from './formula-input.ts';
import { largestVector } from './paint.ts';

export interface EditorContext {
  basin: BasinBox;
  runDays: number;
  seed: string;
  index: number;
  /** The part changed; `record` starts a new undo step, `rebuild` asks for a fresh editor. */
  change(part: WindPart, opts: { record: boolean; rebuild: boolean }): void;
  markDay(): number | null;
}

export interface PartEditor {
  el: HTMLElement;
  showIssues(issues: Array<ScenarioIssue & { rel: string }>): void;
  redrawPlot(): void;
  /** Only the model-day marker moved: redraw the kept series. */
  redrawMarker(): void;
}

let serial = 0;

export function partEditor(initial: WindPart, ctx: EditorContext): PartEditor {
  let part = initial;
  const id = `wd${++serial}`;
  const el = document.createElement('div');
  el.className = 'wd-editor';
  const msgs = new Map<string, HTMLElement>();
  const general = document.createElement('ul');
  general.className = 'issues';

  const commit = (next: WindPart, record: boolean, rebuild = false) => {
    part = next;
    ctx.change(part, { record, rebuild });
    plot();
  };

  const row = (path: string, label: string, units: string, control: HTMLElement): HTMLElement => {
    const wrap = document.createElement('div');
    wrap.className = 'param wd-field';
    wrap.dataset.path = path;
    const lab = document.createElement('label');
    const name = document.createElement('span');
    name.textContent = label;
    const unit = document.createElement('span');
    unit.className = 'unit';
    unit.textContent = units;
    lab.append(name, control, unit);
    const hint = document.createElement('div');
    hint.className = 'range-hint';
    hint.textContent = rangeHint(part, path);
    const d = describe(part, path);
    if (d) lab.title = d;
    const msg = document.createElement('div');
    msg.className = 'field-msg';
    msg.id = `${id}-${path.replace(/\./g, '-')}-msg`;
    control.setAttribute('aria-describedby', msg.id);
    msgs.set(path, msg);
    wrap.append(lab, hint, msg);
    return wrap;
  };

  const select = (
    path: string,
    label: string,
    options: string[],
    value: string,
    onPick: (v: string) => void,
  ): HTMLElement => {
    const s = document.createElement('select');
    s.name = path;
    for (const o of options) s.add(new Option(o, o));
    s.value = value;
    s.addEventListener('change', () => onPick(s.value));
    return row(path, label, '', s);
  };

  /** A text box; the first keystroke after focusing starts an undo step, later ones extend it. */
  const box = (path: string, label: string, units: string, kind: 'number' | 'text', optional: boolean): HTMLElement => {
    const input = document.createElement('input');
    input.type = 'text';
    input.name = path;
    input.autocomplete = 'off';
    if (kind === 'number') input.inputMode = 'decimal';
    input.value = showValue(part, path);
    if (optional) input.placeholder = 'not set';
    let fresh = true;
    input.addEventListener('focus', () => (fresh = true));
    input.addEventListener('input', () => {
      const raw = input.value;
      let v: unknown = kind === 'number' ? readNumber(raw) : raw;
      if (optional && raw.trim() === '') v = undefined;
      commit(setAt(part, path, v), fresh);
      fresh = false;
    });
    const w = row(path, label, units, input);
    // A text (a name) gets the whole row, so it is never cut (style.css).
    if (kind === 'text') w.classList.add('text');
    return w;
  };

  const fieldsHost = document.createElement('div');
  fieldsHost.className = 'wd-fields';
  const units = part.kind === 'answering' || part.quantity === 'wind' ? 'm s-1' : 'N m-2';

  // Name and quantity (an answering part gives wind, and says how it becomes stress).
  fieldsHost.append(box('name', 'Name', '', 'text', true));
  if (part.kind === 'answering') {
    fieldsHost.append(
      select('drag', 'Wind to stress', ['linear', 'bulk'], part.drag, (v) => commit(setAt(part, 'drag', v), true)),
    );
    const region = part.sst.region;
    fieldsHost.append(
      select('sst.region.kind', 'Upwelling region', SHAPE_KINDS, region.kind, (v) =>
        commit(setAt(part, 'sst.region', defaultShape(v as ShapeSpec['kind'], ctx.basin)), true, true),
      ),
    );
    if (region.kind === 'band') {
      fieldsHost.append(
        select('sst.region.profile.kind', 'Region latitude profile', PROFILE_KINDS, region.profile.kind, (v) =>
          commit(setAt(part, 'sst.region.profile', defaultProfile(v as BandProfile['kind'])), true, true),
        ),
      );
    }
    if (region.kind === 'formula') {
      const f = formulaInput(
        region.expression,
        ctx.basin,
        '0 to 1',
        (text) => commit(setAt(part, 'sst.region.expression', text), true),
        id,
      );
      const msg = document.createElement('div');
      msg.className = 'field-msg';
      msgs.set('sst.region.expression', msg);
      f.append(msg);
      fieldsHost.append(f);
    }
  } else {
    fieldsHost.append(
      select('quantity', 'Given as', ['stress', 'wind'], part.quantity, (v) =>
        commit(setAt(part, 'quantity', v), true, true),
      ),
    );
  }
  const pattern = patternOf(part);
  if (part.kind === 'fixed' && part.source.kind === 'shaped') {
    const shape = part.source.shape;
    fieldsHost.append(
      select('source.shape.kind', 'Pattern', SHAPE_KINDS, shape.kind, (v) =>
        commit(setAt(part, 'source.shape', defaultShape(v as ShapeSpec['kind'], ctx.basin)), true, true),
      ),
    );
    if (shape.kind === 'band') {
      fieldsHost.append(
        select('source.shape.profile.kind', 'Latitude profile', PROFILE_KINDS, shape.profile.kind, (v) =>
          commit(setAt(part, 'source.shape.profile', defaultProfile(v as BandProfile['kind'])), true, true),
        ),
      );
    }
    if (shape.kind === 'formula') {
      const f = formulaInput(
        shape.expression,
        ctx.basin,
        units,
        (text) => commit(setAt(part, 'source.shape.expression', text), true),
        id,
      );
      const msg = document.createElement('div');
      msg.className = 'field-msg';
      msgs.set('source.shape.expression', msg);
      f.append(msg);
      fieldsHost.append(f);
    }
  }
  if (part.kind === 'fixed' && part.source.kind === 'file') {
    fieldsHost.append(
      select('source.format', 'File format', ['csv', 'netcdf'], part.source.format, (v) =>
        commit(setAt(part, 'source.format', v), true),
      ),
    );
    const note = document.createElement('p');
    note.className = 'hint';
    note.textContent =
      'The command line reads this file next to the scenario. The page cannot reach your disk by path: use "Import CSV or NetCDF" to store the data in the scenario instead.';
    fieldsHost.append(note);
  }
  if (part.kind === 'fixed' && part.source.kind === 'painted') {
    const g = part.source.grid;
    const p = document.createElement('p');
    p.className = 'hint wd-painted-info';
    p.textContent = `Painted grid: ${g.nLon} x ${g.nLat} points, ${g.dLon}° x ${g.dLat}°, from ${placeLabel(g.lon0, g.lat0)}; largest vector ${Number(largestVector(g).toPrecision(3))} ${units}. Choose "paint" in the map tools to paint it.`;
    fieldsHost.append(p);
  }
  for (const f of fieldsOf(part))
    fieldsHost.append(box(f.path, f.label, f.units, f.type === 'number' ? 'number' : 'text', f.optional === true));

  // Envelope (fixed parts).
  if (part.kind === 'fixed') {
    const env = part.envelope;
    const kindRow = select('envelope.kind', 'Time envelope', ENVELOPE_KINDS, env.kind, (v) =>
      commit(setAt(part, 'envelope', defaultEnvelope(v as EnvelopeSpec['kind'], ctx.runDays)), true, true),
    );
    // The envelope kind goes before its own fields.
    const firstEnv = [...fieldsHost.children].find((c) => (c as HTMLElement).dataset.path?.startsWith('envelope.'));
    fieldsHost.insertBefore(kindRow, firstEnv ?? null);
    if (env.kind === 'ramp') {
      fieldsHost.append(
        select('envelope.direction', 'Direction', ['up', 'down'], env.direction, (v) =>
          commit(setAt(part, 'envelope.direction', v), true),
        ),
      );
    }
    if (env.kind === 'harmonics') {
      const add = document.createElement('button');
      add.type = 'button';
      add.textContent = 'Add a harmonic';
      add.addEventListener('click', () =>
        commit(
          setAt(part, 'envelope.terms', [...env.terms, { period: 182.5, amplitude: 0.5, peakDay: 0 }]),
          true,
          true,
        ),
      );
      const drop = document.createElement('button');
      drop.type = 'button';
      drop.textContent = 'Remove the last';
      drop.disabled = env.terms.length === 0;
      drop.addEventListener('click', () => commit(setAt(part, 'envelope.terms', env.terms.slice(0, -1)), true, true));
      const r = document.createElement('div');
      r.className = 'row small';
      r.append(add, drop);
      fieldsHost.append(r);
    }
    if (env.kind === 'table') {
      const ta = document.createElement('textarea');
      ta.rows = Math.min(8, env.points.length + 1);
      ta.value = tableText(env.points);
      ta.spellcheck = false;
      const local = document.createElement('div');
      local.className = 'field-msg';
      let fresh = true;
      ta.addEventListener('focus', () => (fresh = true));
      ta.addEventListener('input', () => {
        const r = parseTable(ta.value);
        // A line that does not read yet keeps the last good table in the design.
        local.textContent = r.ok ? '' : r.message;
        if (r.ok) {
          commit(setAt(part, 'envelope.points', r.points), fresh);
          fresh = false;
        }
      });
      const w = row('envelope.points', 'Table: one "day, factor" per line', '', ta);
      w.append(local);
      fieldsHost.append(w);
    }
  }
  el.append(fieldsHost, general);

  // The time plot.
  const canvas = document.createElement('canvas');
  canvas.width = 300;
  canvas.height = 90;
  canvas.className = 'wd-plot';
  canvas.setAttribute('aria-label', pattern === 'bursts' ? 'Random bursts over the run' : 'Time envelope over the run');
  const plotMsg = document.createElement('div');
  plotMsg.className = 'field-msg';
  el.append(canvas, plotMsg);
  if (part.kind === 'answering') {
    // It has no envelope: its stress follows the run's own SST. The preview shows its answer to a warm region.
    canvas.hidden = true;
    const note = document.createElement('p');
    note.className = 'hint wd-answering-note';
    note.textContent =
      'This wind answers the run\u2019s own sea-surface temperature: the thermocline sets the SST anomaly over the upwelling region, and a Gill atmosphere answers its heating. It has no time envelope. The preview shows its answer to a warming of 1 K times the region.';
    el.append(note);
  }
  let series: { days: number[]; values: number[]; units: string } | null = null;
  const marker = () => {
    if (series)
      drawTimePlot(
        canvas,
        series.days,
        [{ values: series.values, colour: '#0b5cad', label: 'envelope' }],
        series.units,
        ctx.markDay(),
      );
  };
  const plot = () => {
    try {
      const days = dayAxis(ctx.runDays);
      series = { days, ...partSeries(part, days, ctx.seed, ctx.index) };
      plotMsg.textContent = '';
      marker();
    } catch (e) {
      series = null;
      plotMsg.textContent = (e as Error).message;
    }
  };
  plot();

  return {
    el,
    showIssues(issues) {
      for (const m of msgs.values()) {
        m.textContent = '';
        m.parentElement?.classList.remove('invalid');
      }
      const rest: string[] = [];
      for (const i of issues) {
        // The deepest field at or above the issue's path takes it.
        let p = i.rel;
        let target: HTMLElement | undefined;
        for (;;) {
          target = msgs.get(p);
          if (target || !p.includes('.')) break;
          p = p.slice(0, p.lastIndexOf('.'));
        }
        if (target) {
          target.textContent = target.textContent ? `${target.textContent}; ${i.message}` : i.message;
          target.parentElement?.classList.add('invalid');
        } else rest.push(`${i.rel || 'this part'}: ${i.message}`);
      }
      general.replaceChildren(...rest.map((t) => Object.assign(document.createElement('li'), { textContent: t })));
    },
    redrawPlot: plot,
    redrawMarker: marker,
  };
}

/** Read a value for a test or a summary without knowing the part's shape. */
export const valueAt = getAt;
