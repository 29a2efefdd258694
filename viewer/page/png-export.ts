// PNG export: the map with its overlay, the colour bar, the Hovmoller diagram and the probe chart,
// one under the other below a title line.

import { download } from '../files.ts';
import { displayField } from '../state/display-fields.ts';
import { $ } from './dom.ts';
import type { Page } from './page.ts';

export function exportPng(page: Page): void {
  const { map, probePanel, state, info } = page;
  const parts = [
    map.compose(),
    $<HTMLCanvasElement>('colour-bar'),
    $<HTMLCanvasElement>('hovmoller'),
    probePanel.canvas(),
  ].filter((c): c is HTMLCanvasElement => c !== null);
  const title = `${state.run?.name ?? 'Pycno'}, ${displayField(state.fieldKey).label}, day ${info.shownDay.toFixed(1)}`;
  const w = Math.max(...parts.map((p) => p.width));
  const h = 24 + parts.reduce((s, p) => s + p.height + 8, 0);
  const out = document.createElement('canvas');
  out.width = w;
  out.height = h;
  const ctx = out.getContext('2d')!;
  ctx.fillStyle = '#fff';
  ctx.fillRect(0, 0, w, h);
  ctx.fillStyle = '#000';
  ctx.font = '14px system-ui, sans-serif';
  ctx.fillText(title, 8, 17);
  let y = 24;
  for (const p of parts) {
    ctx.drawImage(p, 0, y);
    y += p.height + 8;
  }
  const day = Math.round(info.shownDay);
  out.toBlob((blob) => {
    if (blob) download(blob, `pycno-day${day}.png`, 'image/png');
  }, 'image/png');
}
