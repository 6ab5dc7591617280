// `thickring play RESULT [--tube R] [--cap N] [--json]`: locked or rattling? First-order mobility,
// the second-order test at a claimed optimum, and how far each ring can move on its own.
import type { Command } from 'commander';
import { analyzePlay, fmt, type PlayReport } from '../src/analyze/play.js';
import { CAUTION_TEXT } from '../src/fabricate/cautions.js';
import { InputError } from '../src/model/errors.js';
import { readResultFile } from '../src/model/resultFile.js';
import { textTable } from '../reports/format.js';
import { emit, type Io } from './io.js';

export function register(program: Command, io: Io): void {
  program
    .command('play')
    .description('Locked or rattling? Free motions of the rings at their contacts, the second-order test, and each ring\'s play.')
    .argument('<result>', 'Result file (format thickring-result/1, from inflate or compare -o); a weave cell or a block of cells is analysed with its lattice.')
    .option('--tube <r>', 'Common tube radius to analyse, in the result\'s units (default: the result\'s own), for example the printed wire after clearance.')
    .option('--cap <n>', 'Largest translation searched per direction, in the result\'s units (default: 4 times the largest core radius).')
    .option('--json', 'Print one JSON object instead of text.')
    .action(async (file: string, opts: { tube?: string; cap?: string; json?: boolean }) => {
      const result = readResultFile(file);
      const tube = opts.tube === undefined ? undefined : positive(opts.tube, '--tube', 'a tube radius in layout units, e.g. --tube 0.3');
      const cap = opts.cap === undefined ? undefined : positive(opts.cap, '--cap', 'a distance in layout units, e.g. --cap 5');
      const progress = progressLines(io);
      // Re-say the running stage every second while a long stage (the mobility LPs) keeps the loop free.
      const ticker = setInterval(() => progress(null), 1000);
      ticker.unref();
      let report: PlayReport;
      try {
        report = await analyzePlay(result, {
          ...(tube !== undefined ? { tube } : {}),
          ...(cap !== undefined ? { translationCap: cap } : {}),
          onProgress: progress,
        });
      } finally {
        clearInterval(ticker);
      }
      emit(io, opts.json === true, report, () => formatPlay(report, file));
    });
}

/** Progress lines on stderr, once the run has taken more than a second (quick runs stay quiet), at most 4 a second. */
export function progressLines(io: Io, now: () => number = () => performance.now()): (stage: string | null) => void {
  const t0 = now();
  let last = -Infinity;
  let current = 'starting';
  // null: no new stage, only "still running" (said at most once a second).
  return (stage) => {
    if (stage !== null) current = stage;
    const t = now();
    if (t - t0 < 1000 || t - last < (stage === null ? 1000 : 250)) return;
    last = t;
    io.err(`play: ${current} (${((t - t0) / 1000).toFixed(1)} s)`);
  };
}

/** Human-readable report; lengths carry the result's units, angles degrees. */
export function formatPlay(r: PlayReport, file: string): string {
  const u = r.units ?? 'layout units';
  const lines: string[] = [];
  lines.push(`Play of ${file} (${r.spec}, ${r.rings.length} rings, solve status ${r.status})`);
  lines.push(`Tube analysed: ${fmt(r.tube)} ${u} (the result's: ${fmt(r.resultTube)} ${u}); aspect ratio of the result ${fmt(r.aspectRatio)} (dimensionless)`);
  const verdict = r.locked
    ? `LOCKED except for spins (${r.lockedBy === 'first-order' ? 'no first-order motion' : 'every first-order motion closes a contact at second order'})`
    : r.secondOrder.escape
      ? 'NOT LOCKED: a motion opens every contact, so the rings can be made thicker'
      : 'NOT LOCKED: the rings can move';
  lines.push(`Verdict: ${verdict}`);
  lines.push(`Active contacts: ${r.mobility.activeContacts} (clearance <= ${fmt(r.mobility.activeTol)} ${u})` +
    (r.mobility.continua.length > 0
      ? `; touching along whole circles: ${r.mobility.continua.map((c) => `${c.a}-${c.b} (${c.kind}, ${c.samples} samples on ${c.sampledRing})`).join(', ')}`
      : ''));
  lines.push(`First-order free motions beyond spins and moving the whole set: ${r.freeDimension} (${r.reversibleDimension} reversible) (dimensionless count)`);
  for (const m of r.freeMotions) lines.push(`  - ${m.description}`);
  lines.push(`Second order: ${r.secondOrder.outcome} — ${r.secondOrder.detail}`);
  if (r.secondOrder.direction) lines.push(`  direction: ${r.secondOrder.direction.description}`);
  if (r.secondOrder.thickenedTube !== null) {
    const gain = r.secondOrder.thickenedTube - r.tube;
    lines.push(`  following it reaches a common tube of ${r.secondOrder.thickenedTube.toPrecision(8)} ${u} (from ${r.tube.toPrecision(8)} ${u}, +${fmt(gain)} ${u}); re-inflate from there without symmetry for the full gain`);
  }
  lines.push('');
  lines.push(`Play of each ring alone, others held still, at tube ${fmt(r.play.tube)} ${u} (translations in ${u}, turns in degrees; spin is always free; ">" = free beyond the cap)`);
  const head = ['ring', '+x', '-x', '+y', '-y', '+z', '-z', '+u°', '-u°', '+v°', '-v°', 'u axis', 'v axis'];
  const rows = r.play.rings.map((ring) => [
    ring.name,
    ...ring.entries.map((e) => (e.capped ? `>${fmt(e.amount)}` : `${fmt(e.amount)}${e.budgetExhausted ? '+' : ''}`)),
    vec(ring.axes.u),
    vec(ring.axes.v),
  ]);
  lines.push(textTable(head, rows));
  for (const n of r.notes) lines.push(`Note: ${n}`);
  lines.push('Play is geometric, for perfectly round rings of exact size; printed or bent rings shrink, sag and spring back, and rings that rattle can pinch skin or hair.');
  lines.push(CAUTION_TEXT);
  return lines.join('\n');
}

function positive(text: string, flag: string, what: string): number {
  const v = Number(text);
  if (!Number.isFinite(v) || v <= 0) throw new InputError(`${flag} ${text} must be a number > 0: give ${what}`);
  return v;
}

function vec(v: readonly number[]): string {
  return `(${v.map((c) => (Math.abs(c) < 5e-4 ? 0 : c).toFixed(3)).join(', ')})`;
}
