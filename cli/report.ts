// `thickring report RESULT.json -o report.html`: one standalone HTML file (plotting library inlined,
// no network) with the 3D view, the curves, the figures and, when it can be computed, the play.
import type { Command } from 'commander';
import { analyzePlay } from '../src/analyze/play.js';
import { InputError } from '../src/model/errors.js';
import type { SolveResult } from '../src/model/result.js';
import { buildReportHtml, type PlayView } from '../reports/html.js';
import { readReportInput } from '../reports/input.js';
import { loadPlotlySource, loadViewSource } from '../reports/plotlySource.js';
import { playView } from '../reports/playView.js';
import { writeFileAtomic } from './files.js';
import { emit, type Io } from './io.js';

export const REPORT_FORMAT = 'thickring-report/1';

export interface ReportSummary {
  format: typeof REPORT_FORMAT;
  command: 'report';
  input: string;
  output: string;
  bytes: number;
  plots: string[];
  sections: string[];
  /** Why the play section is missing, when it is. */
  playSkipped: string | null;
}

export function register(program: Command, io: Io): void {
  program
    .command('report')
    .description('Write a standalone HTML report (works offline) of a result file from inflate or compare.')
    .argument('<result>', 'Result file (format thickring-result/1, from inflate -o or compare -o), rings or a weave cell.')
    .option('-o, --output <file>', 'The HTML file to write (required), for example -o report.html.')
    .option('--no-play', 'Leave out the play analysis (locked or rattling?).')
    .option('--json', 'Print one JSON object describing the report instead of text.')
    .action(async (file: string, opts: { output?: string; play: boolean; json?: boolean }) => {
      const summary = await runReport(file, { output: opts.output, play: opts.play });
      emit(io, opts.json === true, summary, () => formatReportSummary(summary));
    });
}

/** Check the input, build the page, then write it in one go: bad input leaves nothing behind. */
export async function runReport(file: string, opts: { output: string | undefined; play: boolean }): Promise<ReportSummary> {
  const output = opts.output;
  if (output === undefined || output.trim() === '') {
    throw new InputError('report: no output file; give one with -o, e.g. thickring report result.json -o report.html');
  }
  const result = readReportInput(file);
  let play: PlayView | null = null;
  let playSkipped: string | null = opts.play ? null : 'left out (--no-play)';
  if (opts.play) {
    const p = await playSection(result);
    play = p.view;
    playSkipped = p.skipped;
  }
  const built = buildReportHtml(result, {
    plotlySource: loadPlotlySource(),
    viewSource: loadViewSource(),
    play,
    sourceName: file.split(/[\\/]/).pop() ?? file,
    generatedAt: new Date().toISOString().replace(/\.\d+Z$/, 'Z'),
  });
  writeFileAtomic(output, built.html);
  return {
    format: REPORT_FORMAT,
    command: 'report',
    input: file,
    output,
    bytes: Buffer.byteLength(built.html, 'utf8'),
    plots: built.plots,
    sections: built.sections,
    playSkipped,
  };
}

export function formatReportSummary(s: ReportSummary): string {
  const mb = (s.bytes / 1e6).toFixed(1);
  const lines = [
    `Report written to ${s.output} (${mb} MB, one file, opens offline in any browser).`,
    `Sections: ${s.sections.join('; ')}.`,
    `Plots: ${s.plots.length}.`,
  ];
  if (s.playSkipped) lines.push(`Play section: ${s.playSkipped}.`);
  return lines.join('\n');
}

// The play analysis is a bonus: a result it cannot analyse still gets a report, with the reason.
async function playSection(result: SolveResult): Promise<{ view: PlayView | null; skipped: string | null }> {
  if (result.status !== 'optimal' && result.status !== 'stalled') {
    return { view: null, skipped: `not analysed: the result's status is ${result.status}` };
  }
  try {
    return { view: playView(await analyzePlay(result)), skipped: null };
  } catch (e) {
    const msg = e instanceof Error ? e.message.split('\n')[0]! : String(e);
    return { view: null, skipped: `not analysed (${msg})` };
  }
}
