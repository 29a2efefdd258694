// A sweep summary opened in the page (pycno sweep --gather, docs/ensembles.md): what it holds, one
// row per member with its varied values, state and main results, and its spread report (the same
// page `pycno report SUMMARY.nc` writes) as a download. A summary is not a run: it is shown here,
// not saved in the library.

import type { SummaryData } from '../../model/ensemble/summary-read.ts';
import { spreadReport } from '../../model/report/spread-report.ts';
import { button, el } from './dom.ts';
import { download, fileSafe } from '../files.ts';

const fmt = (x: number | undefined) =>
  x !== undefined && Number.isFinite(x) ? Number(x.toPrecision(4)).toString() : '–';

export class SummaryView {
  readonly root = el('section', { id: 'lib-summary', className: 'lib-summary', hidden: true });
  /** What the page shows, for the browser tests. */
  state: {
    file: string;
    members: number;
    complete: number;
    failed: number;
    missing: number;
    ensembles: number;
    rows: string[][];
  } | null = null;

  show(s: SummaryData, fileName: string): void {
    const count = (k: string) => s.members.filter((m) => m.state === k).length;
    const paths = s.vary.map((v) => v.path);
    const rows = s.members.map((m) => [
      String(m.id),
      ...paths.map((p) => m.values[p] ?? ''),
      m.state,
      fmt(m.scalars.kelvin_speed),
      fmt(m.scalars.ssh_peak),
      fmt(m.scalars.energy_end),
      (m.message ?? '').split('\n')[0],
    ]);
    const head = [
      'member',
      ...paths,
      'state',
      'Kelvin speed (m/s)',
      'peak sea level (m)',
      'energy at the end (J)',
      'note',
    ];
    const table = el(
      'table',
      { className: 'lib-summary-table' },
      el('tr', {}, ...head.map((h) => el('th', {}, h))),
      ...rows.map((r) => el('tr', { className: `member-${r[paths.length + 1]}` }, ...r.map((c) => el('td', {}, c)))),
    );
    const reportBtn = button('Spread report…', {
      id: 'lib-summary-report',
      title: 'The summary as a printable page: results per member, mean ± standard deviation per seed ensemble',
    });
    reportBtn.addEventListener('click', () =>
      download(
        spreadReport(s, { source: fileName }),
        `${fileSafe(fileName.replace(/\.nc$/i, ''))}-report.html`,
        'text/html',
      ),
    );
    const closeBtn = button('Close', { id: 'lib-summary-close' });
    closeBtn.addEventListener('click', () => this.close());
    const ens = s.groups.length;
    this.root.replaceChildren(
      el('h3', {}, `Sweep summary: ${s.title} (${fileName})`),
      el(
        'p',
        { id: 'lib-summary-line' },
        `${s.members.length} members over ${paths.join(' x ')}: ${count('complete')} complete, ${count('failed')} failed, ${count('missing')} missing` +
          (ens ? `; mean and standard deviation over the seeds in ${ens} seed ensemble${ens > 1 ? 's' : ''}` : ''),
      ),
      el('div', { className: 'row' }, reportBtn, closeBtn),
      table,
    );
    this.root.hidden = false;
    this.state = {
      file: fileName,
      members: s.members.length,
      complete: count('complete'),
      failed: count('failed'),
      missing: count('missing'),
      ensembles: ens,
      rows,
    };
  }

  close(): void {
    this.root.hidden = true;
    this.root.replaceChildren();
    this.state = null;
  }
}
