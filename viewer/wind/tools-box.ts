// The wind panel's "on the map" box: which map tool is on (patch, band, paint, point) and the
// paint brush, read from its boxes with a message for a value out of range.

import { $new, numberBox } from './dom.ts';
import type { ToolMode } from './map-tools.ts';
import type { Brush } from './paint.ts';

const TOOL_NAMES: Array<[ToolMode, string]> = [
  ['off', 'none (map clicks add probes)'],
  ['patch', 'move / size / turn the patch'],
  ['band', 'draw the latitude band'],
  ['paint', 'paint'],
  ['point', 'pick the time-series point'],
];

export class ToolsBox {
  readonly el: HTMLFieldSetElement;
  private readonly radius: HTMLInputElement;
  private readonly strength: HTMLInputElement;
  private readonly direction: HTMLInputElement;
  private readonly soft: HTMLInputElement;
  private readonly mode: HTMLSelectElement;
  private readonly brushMsg: HTMLElement;
  private readonly toolMsg: HTMLElement;

  /** `picked` is called when the user picks a tool. */
  constructor(picked: (mode: ToolMode) => void) {
    const radios = TOOL_NAMES.map(([v, t]) => {
      const input = $new('input', { type: 'radio', name: 'wd-tool', value: v, checked: v === 'off' });
      input.addEventListener('change', () => {
        picked(v);
        this.say('');
      });
      return $new('label', {}, input, ` ${t}`);
    });
    const [radL, rad] = numberBox('wd-brush-radius', '4', 'size', '°', 3);
    const [strL, str] = numberBox('wd-brush-strength', '0.05', 'strength', 'N m-2 or m s-1', 5);
    const [dirL, dir] = numberBox('wd-brush-dir', '0', 'toward', '° (0 east, 90 north)', 4);
    const [softL, soft] = numberBox('wd-brush-soft', '0.5', 'soft edge', '(0 hard – 1 soft)', 3);
    this.radius = rad;
    this.strength = str;
    this.direction = dir;
    this.soft = soft;
    this.mode = $new('select', { id: 'wd-brush-mode' });
    for (const [v, t] of [
      ['paint', 'paint'],
      ['soften', 'soften'],
      ['erase', 'erase'],
    ])
      this.mode.add(new Option(t, v));
    this.brushMsg = $new('span', { className: 'field-msg', id: 'wd-brush-msg' });
    for (const b of [rad, str, dir, soft]) b.addEventListener('input', () => this.brush());
    this.toolMsg = $new('div', { className: 'hint', id: 'wd-tool-msg', role: 'status' });
    this.el = $new(
      'fieldset',
      { className: 'wd-box' },
      $new('legend', { textContent: 'On the map' }),
      $new('div', { className: 'row small' }, ...radios),
      $new(
        'div',
        { className: 'row small' },
        $new('span', { textContent: 'Brush:' }),
        this.mode,
        radL,
        strL,
        dirL,
        softL,
        this.brushMsg,
      ),
      $new('div', {
        className: 'hint',
        textContent:
          'With a tool on, the map also takes keys: arrows move, [ ] { } resize, , . turn a patch; Space paints at the brush; Enter picks the point. Ctrl+Z undoes any change.',
      }),
      this.toolMsg,
    );
  }

  /** Show a tool as picked (the panel picked it for the user). */
  show(mode: ToolMode): void {
    const radio = this.el.querySelector<HTMLInputElement>(`input[name="wd-tool"][value="${mode}"]`);
    if (radio) radio.checked = true;
  }

  /** A line under the tools (what a tool did, or why it did nothing). */
  say(text: string): void {
    this.toolMsg.textContent = text;
  }

  /** The brush as the boxes have it; a value out of range keeps its last good value and says so. */
  brush(): Brush {
    const problems: string[] = [];
    const read = (b: HTMLInputElement, name: string, lo: number, hi: number, fallback: number): number => {
      const v = Number(b.value);
      const ok = b.value.trim() !== '' && Number.isFinite(v) && v >= lo && v <= hi;
      b.classList.toggle('bad', !ok);
      if (!ok) problems.push(`brush ${name} must be a number from ${lo} to ${hi} (got '${b.value}')`);
      return ok ? v : fallback;
    };
    const brush: Brush = {
      radius: read(this.radius, 'size', 0.05, 90, 4),
      strength: read(this.strength, 'strength', -100, 100, 0),
      directionDeg: read(this.direction, 'direction', -360, 360, 0),
      softEdge: read(this.soft, 'soft edge', 0, 1, 0.5),
      mode: this.mode.value as Brush['mode'],
    };
    this.brushMsg.textContent = problems.length ? `${problems.join('; ')}; the last good value is used` : '';
    return brush;
  }
}
