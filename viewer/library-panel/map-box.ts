// A small map of one field (the page's own WebGL map, MapView) with its colour bar, for a saved
// run or one side of a comparison. The WebGL context is made on first use.

import { drawColourBar } from '../panels/colour-bar.ts';
import { lookupTable, MAP_TITLES, type MapName } from '../render/colour-maps.ts';
import { MapView, type Mark } from '../render/map-view.ts';
import type { Range } from '../state/colour-range.ts';
import type { GridInfo } from '../../worker/protocol.ts';
import { el } from './dom.ts';

export class MapBox {
  readonly root: HTMLElement;
  readonly gl: HTMLCanvasElement;
  private readonly overlay: HTMLCanvasElement;
  private readonly bar: HTMLCanvasElement;
  private readonly title: HTMLElement;
  private view: MapView | null = null;
  private grid: GridInfo | null = null;

  constructor(
    idPrefix: string,
    label: string,
    private readonly width: number,
  ) {
    this.gl = el('canvas', { id: `${idPrefix}-gl`, 'aria-label': label });
    this.overlay = el('canvas', { className: 'lib-overlay', 'aria-hidden': 'true' });
    this.bar = el('canvas', {
      id: `${idPrefix}-bar`,
      width: Math.min(420, width),
      height: 44,
      'aria-label': `colour bar of ${label}`,
    });
    this.title = el('div', { className: 'lib-map-title' });
    this.root = el(
      'div',
      { className: 'lib-map' },
      this.title,
      el('div', { className: 'lib-map-stack' }, this.gl, this.overlay),
      this.bar,
    );
  }

  setTitle(text: string): void {
    this.title.textContent = text;
  }

  /** Throws NoWebGLError (from the renderer) when the browser gives no WebGL. */
  private ensure(): MapView {
    if (!this.view) this.view = new MapView(this.gl, this.overlay);
    return this.view;
  }

  setGrid(grid: GridInfo): void {
    const v = this.ensure();
    this.grid = grid;
    v.setGrid(grid);
    v.layout(this.width, this.width * 0.6);
  }

  draw(values: Float32Array, range: Range, map: MapName, label: string, units: string, marks: Mark[] = []): void {
    if (!this.grid) return;
    const v = this.ensure();
    v.forgetArrows();
    v.gl.setColourMap(map, lookupTable(map));
    v.draw(values, range, [], marks, null);
    drawColourBar(this.bar, lookupTable(map), range, label, units, MAP_TITLES[map]);
    this.gl.dataset.range = `${range.min},${range.max}`;
  }
}
