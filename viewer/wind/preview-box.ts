// The preview box of the wind panel: the forcing the model will get at a chosen day, as a layer
// (stress, curl, Sverdrup transports) drawn on the map instead of the run's field, with a line
// that says its largest stress and its colour range.

import { placeLabel } from '../../model/display/coordinates.ts';
import type { MapView } from '../render/map-view.ts';
import { formatValue } from '../panels/colour-bar.ts';
import { $new, numberBox } from './dom.ts';
import { LAYER_INFO, PREVIEW_LAYERS, type PreviewLayer } from './preview.ts';
import { computePreview, drawPreview, type PreviewResult } from './preview-view.ts';

type Json = Record<string, unknown>;

export interface PreviewBoxHost {
  map: MapView;
  colourBar: HTMLCanvasElement;
  /** A control of the box changed: recompute on the next frame. */
  changed(): void;
  /** Redraw the map (the page shows the preview or the run). */
  redraw(): void;
}

export class PreviewBox {
  readonly el: HTMLFieldSetElement;
  /** The preview on show, or null (off, invalid design, bad day). */
  result: PreviewResult | null = null;
  /** Why there is no preview while it is on. */
  error = '';
  /** The user typed a preview day: a re-applied scenario keeps it. */
  private dayTyped = false;
  private readonly on: HTMLInputElement;
  private readonly day: HTMLInputElement;
  private readonly layer: HTMLSelectElement;
  private readonly arrows: HTMLInputElement;
  private readonly msg: HTMLElement;

  constructor(private readonly host: PreviewBoxHost) {
    this.on = $new('input', { type: 'checkbox', id: 'wd-preview-on' });
    const [dayL, day] = numberBox('wd-preview-day', '0', 'at day', '', 5);
    this.day = day;
    this.layer = $new('select', { id: 'wd-preview-layer' });
    for (const l of PREVIEW_LAYERS) this.layer.add(new Option(`${LAYER_INFO[l].label} (${LAYER_INFO[l].units})`, l));
    this.arrows = $new('input', { type: 'checkbox', id: 'wd-preview-arrows', checked: true });
    this.msg = $new('div', { className: 'hint', id: 'wd-preview-msg', role: 'status' });
    for (const c of [this.on, this.layer, this.arrows]) c.addEventListener('change', () => host.changed());
    day.addEventListener('input', () => {
      this.dayTyped = true;
      host.changed();
    });
    this.el = $new(
      'fieldset',
      { className: 'wd-box' },
      $new('legend', { textContent: 'Preview (the forcing the model will get, before running)' }),
      $new(
        'div',
        { className: 'row small' },
        $new('label', {}, this.on, ' show on the map'),
        dayL,
        $new('label', {}, 'layer ', this.layer),
        $new('label', {}, this.arrows, ' arrows'),
      ),
      $new('div', {
        className: 'hint',
        textContent:
          'Sverdrup layers: beta V = curl(tau)/rho0 (Sverdrup 1947) and U from continuity, integrated west from the east coast; they predict the steady flow off the equator, such as a counter current under a weak-wind band.',
      }),
      this.msg,
    );
  }

  /** True when the preview is shown on the map (the page then skips its own field). */
  get active(): boolean {
    return this.on.checked;
  }

  /** The day to preview for a scenario just loaded; a day the user typed stays unless the scenario is another one. */
  offerDay(day: number, anotherScenario: boolean): void {
    if (anotherScenario || !this.dayTyped) this.day.value = String(day);
  }

  /** Recompute the preview of the composed scenario (`valid` when it passed the validator). */
  update(valid: boolean, compose: () => Json): void {
    this.result = null;
    this.error = '';
    const msg = this.msg;
    if (!this.on.checked) {
      msg.textContent = '';
      this.host.redraw();
      return;
    }
    const dayText = this.day.value;
    const day = Number(dayText);
    if (dayText.trim() === '' || !Number.isFinite(day) || day < 0) {
      this.error = `preview day must be a number of days >= 0 (got '${dayText}')`;
    } else if (!valid) {
      this.error = 'fix the marked values to see the preview';
    } else {
      try {
        this.result = computePreview(compose(), day, this.layer.value as PreviewLayer);
      } catch (e) {
        this.error = (e as Error).message;
      }
    }
    const p = this.result;
    msg.textContent = p
      ? `Day ${formatValue(p.field.day)}: largest |tau| ${formatValue(p.peak.value)} N m-2${p.peak.value > 0 ? ` at ${placeLabel(p.peak.lon, p.peak.lat)}` : ''}; colours ${formatValue(p.range.min)} to ${formatValue(p.range.max)} ${LAYER_INFO[p.layer].units}.`
      : this.error;
    msg.classList.toggle('field-msg', !p);
    this.host.redraw();
  }

  /** Draw the preview on the map; true when it drew. */
  drawOnMap(): boolean {
    if (!this.result) return false;
    const ok = drawPreview(this.host.map, this.host.colourBar, this.result, this.arrows.checked);
    if (!ok) this.msg.textContent = 'The map shows another basin: apply this scenario first to preview it.';
    return ok;
  }
}
