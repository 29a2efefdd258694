// "Measured against theory": the Kelvin and long Rossby speeds measured on a run's Hovmoller
// diagrams (model/report/measure.ts) beside c = sqrt(g' H) and c/3, as rows for the page.

import { latLabel } from '../../model/display/coordinates.ts';
import { isMeasured, type NotMeasured, type SpeedMeasure, type WaveMeasures } from '../../model/report/measure.ts';
import { formatValue } from '../panels/colour-bar.ts';

export interface WaveRow {
  wave: 'Kelvin' | 'long Rossby';
  /** "2.73 ± 0.01 m/s east at 0.25°N", or why it could not be measured. */
  measured: string;
  theory: string;
  /** Measured over theory, e.g. "1.00", or '' when not measured. */
  ratio: string;
  speed: number | null;
  standardError: number | null;
  theorySpeed: number;
}

function speedText(v: number): string {
  return v.toFixed(Math.abs(v) >= 1 ? 2 : 3);
}

const latText = latLabel;

function row(wave: WaveRow['wave'], m: SpeedMeasure | NotMeasured | null, theory: number, theoryName: string): WaveRow {
  const theoryText = `${theoryName} = ${speedText(theory)} m/s`;
  if (m === null)
    return {
      wave,
      measured: 'not measured: the run has no off-equatorial Hovmoller section',
      theory: theoryText,
      ratio: '',
      speed: null,
      standardError: null,
      theorySpeed: theory,
    };
  if (!isMeasured(m))
    return {
      wave,
      measured: `not measured: ${m.reason}`,
      theory: theoryText,
      ratio: '',
      speed: null,
      standardError: null,
      theorySpeed: theory,
    };
  return {
    wave,
    measured: `${speedText(m.speed)} ± ${formatValue(m.standardError)} m/s ${m.direction} at ${latText(m.lat)} (${m.sign > 0 ? 'downwelling' : 'upwelling'}, ${m.points.length} times)`,
    theory: theoryText,
    ratio: (m.speed / theory).toFixed(2),
    speed: m.speed,
    standardError: m.standardError,
    theorySpeed: theory,
  };
}

export function waveRows(w: WaveMeasures): WaveRow[] {
  return [row('Kelvin', w.kelvin, w.c, 'c'), row('long Rossby', w.rossby, w.rossbyTheory, 'c/3')];
}

/** A table of the rows, with a caption naming the run. */
export function wavesTable(rows: WaveRow[], caption: string): HTMLTableElement {
  const t = document.createElement('table');
  t.className = 'lib-waves';
  const cap = document.createElement('caption');
  cap.textContent = caption;
  const head = document.createElement('tr');
  for (const h of ['wave', 'measured', 'theory', 'measured / theory'])
    head.append(Object.assign(document.createElement('th'), { textContent: h }));
  t.append(cap, head);
  for (const r of rows) {
    const tr = document.createElement('tr');
    tr.dataset.wave = r.wave;
    if (r.speed !== null) tr.dataset.speed = String(r.speed);
    tr.dataset.theory = String(r.theorySpeed);
    for (const v of [r.wave, r.measured, r.theory, r.ratio])
      tr.append(Object.assign(document.createElement('td'), { textContent: v }));
    t.append(tr);
  }
  return t;
}
