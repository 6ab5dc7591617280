// `thickring inflate SPEC|LAYOUT [--json] [-o result.json]`: the thickest common tube the rings allow,
// with the poses, contacts and strut forces, the optimality certificate, the packing bound and an
// independent check of the answer.
import cliProgress from 'cli-progress';
import type { Command } from 'commander';
import { CAUTION_TEXT } from '../src/fabricate/cautions.js';
import { DISPLAY_ZERO_REL, textTable } from '../reports/format.js';
import { weightFigure } from '../reports/summary.js';
import { MAX_REPEATS, repeatResult } from '../src/fabricate/repeat.js';
import { knownOptimum } from '../src/model/catalog.js';
import { InputError } from '../src/model/errors.js';
import { isPeriodicArg } from '../src/model/periodicSpec.js';
import { BOUND_ATTAINED, optimalityOf, optimalityText, type SolveResult } from '../src/model/result.js';
import { resolveSpec } from '../src/model/spec.js';
import { runMultistart, type PeriodicSolveResult, type StartProgress } from '../src/optimize/run/multistart.js';
import type { StartHeartbeat } from '../src/optimize/run/startLoop.js';
import { runPeriodicInflate } from '../src/optimize/run/weave.js';
import type { InflateProblem } from '../src/optimize/run/problem.js';
import { emitResult } from './files.js';
import type { Io } from './io.js';
import { addSolveOptions, readSolveOptions, resolveSymmetry, type SolveCliOptions } from './options.js';

export interface InflateRun {
  result: SolveResult;
  /** Lines for the human text: where the symmetry came from, the known optimum, tube ratios. */
  notes: string[];
}

export function register(program: Command, io: Io): void {
  const cmd = program
    .command('inflate')
    .description('Thicken the rings as far as they allow: common tube radius, poses, contacts, certificate and bound.')
    .argument('<spec|layout>', 'catalogue spec (hopf, chain:N, necklace:N, star:K, torus:N, weave:NAME; see thickring catalog) or layout JSON file (with a lattice section for a weave)')
    .option('--json', 'print one JSON object (the result file) instead of text')
    .option('-o, --output <file>', 'write the result file (format thickring-result/1)')
    .option('--all-starts', 'run every start, even after one attains the packing bound (a proven global maximum; by default the later starts are skipped)');
  addWeaveOptions(addSolveOptions(cmd)).action(async (arg: string, raw: Record<string, unknown>) => {
    const options = readSolveOptions(raw);
    const json = raw['json'] === true;
    const run = isPeriodicArg(arg) ? await runWeaveInflate(arg, options, raw, io) : await runInflate(arg, options, io, raw);
    emitResult(io, json, raw['output'] as string | undefined, 'configuration', run.result, (output) => formatInflate(run, output));
    if (run.result.status === 'stalled') {
      io.err('thickring: warning: the solve stalled before the certificate held; the tube is feasible (checked) but may not be the largest');
    }
  });
}

/** Resolve the spec, solve with multistart on the worker pool, and collect notes for the text. */
export async function runInflate(arg: string, options: SolveCliOptions, io: Io, raw: Record<string, unknown> = {}): Promise<InflateRun> {
  for (const flag of WEAVE_FLAGS) {
    if (raw[flag.key] !== undefined) throw new InputError(`${flag.name}: applies to weaves only (weave:NAME or a layout with a lattice section); leave it out for ${arg}`);
  }
  const resolved = resolveSpec(arg, options.radii ? { radii: options.radii } : {});
  const layout = resolved.layout;
  const symmetry = resolveSymmetry(options.symmetry, layout);
  const notes: string[] = [];
  if (options.symmetry === undefined && symmetry) {
    notes.push(`Symmetry ${symmetry.type}:${symmetry.order} imposed from the layout file (override with --symmetry none).`);
  }
  notes.push(...resolved.notes);
  const tubeRatios = resolved.tubeRatios;
  const problem: InflateProblem = {
    rings: layout.rings.map(({ tube: _t, ...r }) => r),
    tubeRatios,
    linking: resolved.linking,
    symmetry,
  };
  const progress = progressReporter(io, options.starts, layout.units ?? undefined);
  let result: SolveResult;
  try {
    result = await runMultistart(problem, {
      starts: options.starts,
      workers: options.workers,
      seed: options.seed,
      tol: options.tol,
      timeLimit: options.timeLimit,
      spec: resolved.spec,
      command: 'inflate',
      units: layout.units ?? null,
      onProgress: progress.update,
      onIteration: progress.heartbeat,
      stopAtBound: raw['allStarts'] !== true,
    });
  } finally {
    progress.stop();
  }
  const skipped = options.starts - result.starts.length;
  if (skipped > 0) {
    notes.push(
      `Start ${result.starts.length - 1} attained the packing bound, a proven global maximum, so the other ${skipped} start${skipped > 1 ? 's' : ''}` +
        ` could not do better and ${skipped > 1 ? 'are' : 'is'} left out: not run, or not counted where another worker had` +
        ` already begun ${skipped > 1 ? 'them' : 'it'} (--all-starts runs and counts them all).`,
    );
  }
  const known = resolved.catalog ? knownOptimum(resolved.catalog) : null;
  const equalRadii = layout.rings.every((r) => r.radius === layout.rings[0]!.radius);
  if (known && equalRadii && tubeRatios.every((w) => w === 1)) {
    const R = layout.rings[0]!.radius;
    const ref = known.tubeOverCore * R;
    const rel = (result.tube - ref) / ref;
    notes.push(`Known optimum ${known.formula} = ${num(ref)} ${unitsOf(result)}; this result differs by ${sci(rel)} (relative, dimensionless). Source: ${known.source}.`);
  }
  return { result, notes };
}

/** Options that only weaves take: --density, --wire-diameter, --repeats. */
export function addWeaveOptions(cmd: Command): Command {
  return cmd
    .option('--density <g/cm3|material>', 'weaves: wire density for the weight per length or area, in g/cm3 or a material name (steel, sterling-silver, ...)')
    .option('--wire-diameter <mm>', 'weaves: wire diameter in mm that sets the scale of the weight (default: the layout in mm, else a 1 mm wire)')
    .option('--repeats <n>', 'weaves: write and print a block of n cells per lattice direction instead of the cell (for report, fabricate)');
}

const WEAVE_FLAGS = [
  { key: 'density', name: '--density' }, { key: 'wireDiameter', name: '--wire-diameter' }, { key: 'repeats', name: '--repeats' },
] as const;

/** A weave: the periodic solve (src/optimize/run/weave.ts), optionally expanded into a block of cells. */
export async function runWeaveInflate(arg: string, options: SolveCliOptions, raw: Record<string, unknown>, io: Io, command = 'inflate'): Promise<InflateRun> {
  if (raw['allStarts'] !== undefined) throw new InputError(`--all-starts: applies to ring links only (a weave has no packing bound to stop at); leave it out for ${arg}`);
  const repeats = raw['repeats'] === undefined ? undefined : repeatCount(raw['repeats']);
  const progress = progressReporter(io, options.starts);
  try {
    const run = await runPeriodicInflate(arg, {
      starts: options.starts, workers: options.workers, seed: options.seed, tol: options.tol, timeLimit: options.timeLimit,
      ...(options.radii ? { radii: options.radii } : {}),
      ...(options.symmetry !== undefined ? { symmetry: options.symmetry } : {}),
      ...(raw['density'] !== undefined ? { density: String(raw['density']) } : {}),
      ...(raw['wireDiameter'] !== undefined ? { wireDiameter: String(raw['wireDiameter']) } : {}),
      onProgress: progress.update,
      onIteration: progress.heartbeat,
    }, command);
    return { result: repeats === undefined ? run.result : repeatResult(run.result, repeats), notes: run.notes };
  } finally {
    progress.stop();
  }
}

function repeatCount(v: unknown): number {
  const text = String(v).trim();
  const n = Number(text);
  if (!/^\d+$/.test(text) || n < 1 || n > MAX_REPEATS) {
    throw new InputError(`--repeats: ${text} must be a whole number from 1 to ${MAX_REPEATS} (cells per lattice direction, for example --repeats 3)`);
  }
  return n;
}

/** The weave lines of the text: lattice, the minimum aspect ratio, density of rings, weight. */
function weaveLines(r: PeriodicSolveResult, u: string): string[] {
  const p = r.periodic;
  const lines = [`Weave: ${p.kind}, ${p.cellRings} rings per cell; minimum aspect ratio (inner diameter / wire diameter) ${num(r.aspectRatio)} (dimensionless)`];
  r.lattice.vectors.forEach((v, k) => lines.push(`Lattice vector ${k + 1}: [${vec(v)}] (${u}), length ${num(Math.hypot(...v))} ${u}`));
  if (p.kind === 'chain') lines.push(`Period ${num(p.periodLength!)} ${u}; ${num(p.ringsPerUnitLength!)} rings per ${u === 'layout units' ? 'layout unit' : u} of length`);
  else lines.push(`Cell area ${num(p.cellArea!)} ${u}^2; ${num(p.ringsPerUnitArea!)} rings per square ${u === 'layout units' ? 'layout unit' : u}`);
  const w = p.weight;
  if (w) {
    const weight = weightFigure(w);
    lines.push(
      `Weight: ${weight.value} ${weight.unit} and ${num(w.rings)} rings per ${w.per} at wire diameter ${num(w.wireDiameterMm)} mm, ` +
        `inner diameter ${num(w.innerDiameterMm)} mm (${w.scale}); density ${w.density.gramsPerCm3} g/cm3${w.density.material ? ` (${w.density.material})` : ''}, ${w.density.source}`,
    );
  }
  const rep = (p as { repeats?: number[] }).repeats;
  if (rep) lines.push(`Rings listed: a block of ${rep.join(' x ')} cells (--repeats); ring A[i] is ring A of cell i`);
  else {
    // Name a ring of this weave that really has a contact with a shifted copy.
    const k = p.contactShifts.findIndex((s) => s.some((x) => x !== 0));
    const name = k >= 0 ? r.rings[r.contacts[k]?.b ?? 0]?.name : undefined;
    if (name !== undefined) lines.push(`Contacts with ${name}[s] touch the copy of ring ${name} shifted by s lattice vectors`);
  }
  return lines;
}

/** Relative gap to the packing bound below which the bound counts as attained (rounding of a 1e-9 solve). */

/** Weaves: the lattice shift of the copy of ring b a contact lies on, e.g. "[-1,0]" (none in the cell). */
function copyLabel(r: SolveResult, k: number): string {
  const shift = (r as Partial<PeriodicSolveResult>).periodic?.contactShifts[k];
  return shift && shift.some((s) => s !== 0) ? `[${shift.join(',')}]` : '';
}

/** Human-readable result; every length carries its units, every ratio says dimensionless. */
export function formatInflate(run: InflateRun, output?: string): string {
  const r = run.result;
  const u = unitsOf(r);
  const L = (x: number): string => `${num(x)} ${u}`;
  const scale = Math.max(...r.rings.map((x) => x.radius));
  const lines: string[] = [];
  lines.push(`thickring inflate ${r.spec}: ${r.rings.length} rings, lengths in ${u}`);
  lines.push(`Status: ${r.status}; ${optimalityText(optimalityOf(r), r.symmetry)}`);
  lines.push(`Tube radius: ${L(r.tube)} (wire diameter ${L(2 * r.tube)})`);
  lines.push(`Tube / smallest core radius: ${num(r.tubeOverCore)} (dimensionless)`);
  lines.push(`Aspect ratio (inner diameter / wire diameter), smallest over the rings${r.aspectRatioRing ? `, ring ${r.aspectRatioRing}` : ''}: ${num(r.aspectRatio)} (dimensionless)`);
  if ('periodic' in r) lines.push(...weaveLines(r as PeriodicSolveResult, u));
  if (r.symmetry) lines.push(`Symmetry imposed: ${r.symmetry.type}:${r.symmetry.order} about axis [${r.symmetry.axis.join(', ')}] through [${r.symmetry.origin.join(', ')}]`);
  else lines.push('Symmetry imposed: none');
  if (r.bound) {
    const b = r.bound;
    lines.push(
      `Upper bound (circle packing): ${L(b.tube)}; ring ${r.rings[b.ring]?.name ?? b.ring} has ${b.through} ring${b.through === 1 ? '' : 's'} through it; ` +
        `gap (bound - tube) / bound = ${sci(b.gap)} (dimensionless)`,
    );
  }
  const c = r.certificate;
  lines.push(
    `Certificate: ${c.method}, ${c.certified ? 'certified' : 'NOT certified'}; balance residual ${sci(c.balanceResidual)}, ` +
      `max violation ${sci(c.maxViolation)} of the tube (both dimensionless); ${c.activeStruts} active constraint${c.activeStruts === 1 ? '' : 's'} weighed` +
        (r.symmetry && r.contacts.length > c.activeStruts ? ` (${r.contacts.length} contacts listed with their images under ${r.symmetry.type}:${r.symmetry.order})` : ''),
  );
  if (c.note) lines.push(`  ${c.note}`);
  // The packing bound holds for every arrangement with this linking pattern, so attaining it settles the global
  // question that the local certificate leaves open.
  if (r.bound && r.verification.ok && r.bound.gap <= BOUND_ATTAINED) {
    lines.push('  The packing bound is attained, so no arrangement of these rings with this linking has a thicker tube: this is the global optimum.');
  }
  const v = r.verification;
  lines.push(
    `Independent check: ${v.ok ? 'passed' : 'FAILED'}; min clearance ${sci(v.minClearance)} of the tube (dimensionless); ` +
      `linking ${v.linkingPreserved ? 'preserved' : 'NOT preserved'}; tube ${v.tubeWithinRadius ? '<=' : 'EXCEEDS'} core radius`,
  );
  for (const m of v.messages) lines.push(`  ${m}`);
  if (r.stopReason !== undefined) lines.push(`Stopped short: ${r.stopReason}; the tube above is the checked one, ${r.bound ? `${sci(r.bound.gap)} (dimensionless) below the packing bound` : 'with no packing bound to compare'}.`);
  for (const n of run.notes) lines.push(n);
  lines.push('');
  lines.push('Rings');
  lines.push(textTable(
    ['name', `centre (${u})`, 'normal (unit)', `core R (${u})`, `tube r (${u})`, 'aspect ratio (dimensionless)'],
    r.rings.map((x) => [x.name, vec(x.center, scale), vec(x.normal), num(x.radius), num(x.tube), num(x.aspectRatio)]),
  ));
  if (r.contacts.length > 0) {
    lines.push('');
    lines.push('Contacts (active struts and sampled points of contact arcs; forces dimensionless, summing to 1)');
    // A whole circle of contact is carried by many sample points: list those that carry force, count the rest.
    const omitted = new Map<string, number>();
    const rows: string[][] = [];
    r.contacts.forEach((x, k) => {
      const pair = `${r.rings[x.a]?.name ?? x.a}-${r.rings[x.b]?.name ?? x.b}${copyLabel(r, k)}`;
      if (x.continuum && !(x.force > 0)) {
        omitted.set(pair, (omitted.get(pair) ?? 0) + 1);
        return;
      }
      rows.push([pair, vec(x.onA, scale), vec(x.onB, scale), num(x.distance), num(x.force), x.continuum ? 'sample of a contact circle' : '']);
    });
    lines.push(textTable(['pair', `on first (${u})`, `on second (${u})`, `core distance (${u})`, 'force', ''], rows));
    for (const [pair, n] of omitted) lines.push(`  ${pair}: ${n} more sample points of the same contact circle carry no force (listed with --json)`);
  }
  lines.push('');
  lines.push('Starts');
  lines.push(textTable(
    ['start', 'seed', 'status', `tube (${u})`, 'iterations', 'worker crashes retried'],
    r.starts.map((s, k) => [String(k), String(s.seed), s.status, num(s.tube), String(s.iterations), String(s.retries)]),
  ));
  const shown = r.starts.findIndex((s) => s.tube === r.tube && (s.lastGains?.length ?? 0) > 0);
  if (shown >= 0) {
    lines.push(`Last gains of start ${shown} (${u}, oldest first): ${r.starts[shown]!.lastGains!.map((g) => g.toExponential(1)).join(', ')}`);
  }
  lines.push('');
  lines.push(`Elapsed: ${r.elapsedSeconds.toFixed(2)} s`);
  if (output) lines.push(`Result written to ${output}`);
  lines.push('');
  lines.push(CAUTION_TEXT);
  return lines.join('\n');
}

// ---- helpers -------------------------------------------------------------------------------------

interface Progress {
  update: (e: StartProgress) => void;
  /** A running start's iteration and tube, heard a few times a second. */
  heartbeat: (e: StartHeartbeat) => void;
  stop: () => void;
}

/** Seconds between "still running" lines when stderr is not a terminal (long solves: chain:20 takes ~1 min). */
const HEARTBEAT_LINE_S = 10;

/**
 * A bar on an interactive stderr (with the latest running start's iteration and tube), else one line per
 * finished start and a "still running" line every HEARTBEAT_LINE_S seconds.
 */
function progressReporter(io: Io, total: number, unit = 'layout units'): Progress {
  if (io.interactive) {
    const bar = new cliProgress.SingleBar(
      { format: 'inflate [{bar}] {value}/{total} starts | {duration_formatted} elapsed | best tube {best} | {running}', stream: process.stderr, clearOnComplete: true, hideCursor: true },
      cliProgress.Presets.shades_classic,
    );
    bar.start(total, 0, { best: '-', running: '' });
    return {
      update: (e) => {
        bar.update(e.done, { best: Number.isNaN(e.bestTube) ? '-' : `${num(e.bestTube)} (${unit})` });
        for (const m of e.errors) io.err(`start ${e.start}: ${m}`);
      },
      heartbeat: (e) => bar.update({ running: `start ${e.start}: iteration ${e.iteration}, tube ${num(e.tube)} (${unit})` }),
      stop: () => bar.stop(),
    };
  }
  const t0 = Date.now();
  let lastLine = t0;
  return {
    heartbeat: (e) => {
      const now = Date.now();
      if (now - lastLine < HEARTBEAT_LINE_S * 1000) return;
      lastLine = now;
      io.err(`... ${Math.round((now - t0) / 1000)} s: start ${e.start} at iteration ${e.iteration}, tube ${num(e.tube)} (${unit})`);
    },
    update: (e) => {
      for (const m of e.errors) io.err(`start ${e.start}: ${m}`);
      io.err(
        `start ${e.start} (${e.done}/${e.total}, seed ${e.seed}) after ${Math.round((Date.now() - t0) / 1000)} s: ${e.status}, tube ${Number.isNaN(e.tube) ? '-' : num(e.tube)}` +
          `${e.retries ? `, ${e.retries} worker crash${e.retries > 1 ? 'es' : ''} retried` : ''}; best ${Number.isNaN(e.bestTube) ? '-' : num(e.bestTube)} (${unit})`,
      );
    },
    stop: () => {},
  };
}

function unitsOf(r: SolveResult): string {
  return r.units ?? 'layout units';
}

function num(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  return String(Number(x.toPrecision(10)));
}

function sci(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  return x.toExponential(2);
}

/** Components below DISPLAY_ZERO_REL of the vector's scale are round-off of an exact 0: shown as 0. */
function vec(v: readonly number[], scale = 1): string {
  const s = Math.max(scale, ...v.map(Math.abs));
  return v.map((x) => (Math.abs(x) < DISPLAY_ZERO_REL * s ? '0' : String(Number(x.toPrecision(6))))).join(', ');
}
