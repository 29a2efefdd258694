// The run report of a short westerly-burst run: measured Kelvin speed near theory, images that
// decode, no script anywhere, every text escaped.

import { describe, expect, it } from 'vitest';
import { toNetcdf } from '../../model/io/run-export.ts';
import { readRun } from '../../model/io/run-import.ts';
import { isMeasured, measureWaves } from '../../model/report/measure.ts';
import { CAUTION, escapeHtml, runReport } from '../../model/report/report.ts';
import { shortBurst } from '../support/run-fixture.ts';
import { decodePng } from '../support/decode-png.ts';

describe('run report', () => {
  it('measures the Kelvin speed within 10 % of sqrt(g H) and gives arrival times in order', async () => {
    const run = await shortBurst();
    const w = measureWaves(run);
    expect(w.c).toBeCloseTo(Math.sqrt(0.05 * 150), 12);
    expect(isMeasured(w.kelvin)).toBe(true);
    if (!isMeasured(w.kelvin)) return;
    expect(Math.abs(w.kelvin.speed - w.c) / w.c).toBeLessThan(0.1);
    expect(w.kelvin.standardError).toBeGreaterThan(0);
    expect(w.kelvin.standardError).toBeLessThan(0.05 * w.c);
    expect(w.kelvin.sign).toBe(1); // a westerly burst deepens the thermocline on the equator
    const [patch, mid, east] = w.arrivals.map((a) => a.day!);
    expect(patch).toBeLessThan(mid);
    expect(mid).toBeLessThan(east);
    // 35° between 'mid' and 'east' at c: about 16.4 days.
    expect(east - mid).toBeGreaterThan(14);
    expect(east - mid).toBeLessThan(19);
  });

  it('is one self-contained page: images decode, no script, the caution line, the speeds', async () => {
    const run = await shortBurst();
    const html = runReport(run, { source: 'short.nc' });
    expect(html).not.toMatch(/<script/i);
    expect(html).not.toMatch(/\son[a-z]+=/i);
    expect(html).not.toMatch(/(src|href)="(?!data:)/);
    expect(html).toContain(escapeHtml(CAUTION));
    const w = measureWaves(run);
    if (!isMeasured(w.kelvin)) throw new Error('no Kelvin fit');
    expect(html).toContain(`<b>${Number(w.kelvin.speed.toPrecision(3))} ± `);
    expect(html).toContain(`theory c = ${Number(w.c.toPrecision(3))} m/s`);
    // The page's conventions: Kelvin solid, long Rossby dashed; places written one way.
    expect(html).toMatch(/\.hov \.kelvin\{[^}]*stroke-dasharray:none/);
    expect(html).toMatch(/\.hov \.rossby\{[^}]*stroke-dasharray:6 4/);
    expect(html).toContain('Solid: a Kelvin wave');
    expect(html).not.toMatch(/-\d+(\.\d+)?°N/);
    expect(html).toMatch(/\d°E, \d+(\.\d+)?°[NS]|\d°E, 0°/);
    const urls = [...html.matchAll(/data:image\/png;base64,([A-Za-z0-9+/=]+)/g)].map((m) => m[1]);
    // 4 maps, their colour bar, the Hovmoller image and its colour bar.
    expect(urls.length).toBe(7);
    const sizes = urls
      .map((u) => decodePng(new Uint8Array(Buffer.from(u, 'base64'))))
      .map((p) => `${p.width}x${p.height}`);
    expect(sizes.filter((s) => s === '100x30')).toHaveLength(4);
    expect(sizes).toContain(`100x${run.days.length}`);
    expect(html.match(/<figure class="probe">/g)).toHaveLength(3);
  });

  it('escapes what the scenario says and reads back from a file the same', async () => {
    const run = await shortBurst();
    const evil = { ...run, name: '<script>alert(1)</script>', description: '"><img src=x onerror=alert(1)>' };
    const html = runReport(evil);
    expect(html).not.toMatch(/<script/i);
    expect(html).not.toMatch(/<img src=x/);
    expect(html).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
    const again = runReport(readRun(await toNetcdf(run)));
    expect(again).toBe(runReport(run));
  });
});
