// `pycno report RUN.nc [--out REPORT.html]`: the run report (model/report/report.ts) as one HTML
// page, written under a temporary name and renamed when complete.

import { basename, resolve as resolvePath } from 'node:path';
import { readFileSync } from 'node:fs';
import { isSummaryFile, readSummary, SummaryFileError } from '../../model/ensemble/summary-read.ts';
import { measureWaves } from '../../model/report/measure.ts';
import { spreadReport } from '../../model/report/spread-report.ts';
import { runReport } from '../../model/report/report.ts';
import { coupledSeries } from '../../model/coupling/run-indices.ts';
import { coupledMode, coupledModeLine } from '../../model/coupling/mode-fit.ts';
import {
  checkOut,
  CommandInputError,
  parseFilesAndOut,
  printError,
  readRunFile,
  speedLine,
  writeComplete,
  type CommandIO,
} from './compare.ts';

export const REPORT_USAGE = 'pycno report RUN.nc|SUMMARY.nc [--out REPORT.html]';

export async function reportCommand(args: readonly string[], io: CommandIO): Promise<number> {
  try {
    const parsed = parseFilesAndOut(args, 'report', 1, REPORT_USAGE);
    if (parsed === 'help') {
      io.stdout.write(`usage: ${REPORT_USAGE}\n`);
      return 0;
    }
    const [file] = parsed.files;
    const out = parsed.out ?? `${basename(file).replace(/\.nc$/i, '')}.html`;
    const reads = [{ path: resolvePath(io.cwd, file), what: `the run file ${file}` }];
    checkOut(io, out, reads);
    // A sweep summary (pycno sweep --gather) gets the spread report instead.
    let head: Uint8Array | null = null;
    try {
      head = new Uint8Array(readFileSync(resolvePath(io.cwd, file)));
    } catch {
      /* readRunFile says why */
    }
    if (head && isSummaryFile(head)) {
      let summary: ReturnType<typeof readSummary>;
      try {
        summary = readSummary(head, file);
      } catch (e) {
        if (e instanceof SummaryFileError) throw new CommandInputError(e.message);
        throw e;
      }
      const page = new TextEncoder().encode(spreadReport(summary, { source: basename(file) }));
      await writeComplete(io, out, reads, 'the report', async (sink) => sink.write(0, page));
      io.stdout.write(
        `sweep summary   ${summary.members.length} members${summary.groups.length ? `, ${summary.groups.length} seed ensemble${summary.groups.length > 1 ? 's' : ''}` : ''}\nreport          ${out} (${Math.round(page.length / 1000)} kB)\n`,
      );
      return 0;
    }
    const run = readRunFile(io, file);
    const html = new TextEncoder().encode(runReport(run, { source: basename(file) }));
    await writeComplete(io, out, reads, 'the report', async (sink) => sink.write(0, html));
    const w = measureWaves(run);
    const c = coupledSeries(run);
    const coupled = c ? `coupled mode    ${coupledModeLine(coupledMode(c.days, c.eastSst, c.warmWater))}\n` : '';
    io.stdout.write(
      `Kelvin speed    ${speedLine(w.kelvin, 'c', w.c)}\nlong Rossby     ${speedLine(w.rossby, 'c/3', w.rossbyTheory)}\n${coupled}report          ${out} (${Math.round(html.length / 1000)} kB)\n`,
    );
    return 0;
  } catch (e) {
    if (e instanceof CommandInputError) {
      printError(io, e.message);
      return 2;
    }
    throw e;
  }
}
