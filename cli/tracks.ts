// `thickring tracks RESULT -o tracks.json`: contact points, contact tracks, relative screw motions and
// swept neighbour curves for gear/groove design, written as one JSON file (schemas/tracks.schema.json).
import { resolve } from 'node:path';
import type { Command } from 'commander';
import { buildTracks, DEFAULT_SAMPLES, MAX_SAMPLES, MIN_SAMPLES, parseRatio, type TracksDocument } from '../src/fabricate/tracks.js';
import { finiteView } from '../src/fabricate/repeat.js';
import { InputError } from '../src/model/errors.js';
import { readResultFile } from '../src/model/resultFile.js';
import { writeFileAtomic } from './files.js';
import { emit, type Io } from './io.js';

interface TracksFlags {
  output?: string;
  ratio?: string;
  samples?: string;
  json?: boolean;
}

export function register(program: Command, io: Io): void {
  program
    .command('tracks')
    .description('Write the contact points, contact tracks and relative screw motions of touching or linked rings, as input for gear or groove design.')
    .argument('<result>', 'Result file (format thickring-result/1); a weave cell is tracked on a block of 3 cells per direction.')
    .option('-o, --output <file>', 'Tracks file to write (JSON, format thickring-tracks/1).')
    .option('--ratio <a:b>', 'Turns of the first ring of each pair to turns of the second, per period (default 1:1).')
    .option('--samples <n>', `Samples per curve and per period, ${MIN_SAMPLES} to ${MAX_SAMPLES} (default ${DEFAULT_SAMPLES}).`)
    .option('--json', 'Print one JSON summary object.')
    .action((resultPath: string, flags: TracksFlags) => {
      run(resultPath, flags, io);
    });
}

function run(resultPath: string, flags: TracksFlags, io: Io): void {
  if (flags.output === undefined) throw new InputError('-o/--output FILE is required: the tracks file to write (e.g. -o tracks.json)');
  if (resolve(flags.output) === resolve(resultPath)) {
    throw new InputError(`-o '${flags.output}' is the result file itself: choose another name for the tracks file`);
  }
  const ratio = parseRatio(flags.ratio ?? '1:1');
  const samplesText = flags.samples ?? String(DEFAULT_SAMPLES);
  const samples = Number(samplesText);
  if (!/^\s*\d+\s*$/.test(samplesText)) {
    throw new InputError(`--samples '${samplesText}' must be a whole number from ${MIN_SAMPLES} to ${MAX_SAMPLES}`);
  }
  // A weave cell lists contacts with copies of its rings in other cells: track them on a block of cells.
  const view = finiteView(readResultFile(resultPath));
  const result = view.result;
  const doc = buildTracks(result, { ratio, samples, source: resultPath });
  if (view.repeats !== null) io.err(`tracks: weave cell of ${resultPath} expanded into a block of ${view.repeats} cells per lattice direction (${result.rings.length} rings; ring A[s] is ring A of cell s)`);
  const text = JSON.stringify(doc);
  writeFileAtomic(flags.output, text);
  emit(io, flags.json === true, summary(doc, flags.output, text.length), () => toText(doc, flags.output!, text.length));
}

function summary(doc: TracksDocument, output: string, bytes: number): unknown {
  return {
    command: 'tracks',
    output,
    bytes,
    format: doc.format,
    source: doc.source,
    units: doc.units,
    angleUnit: doc.angleUnit,
    status: doc.status,
    tube: doc.tube,
    aspectRatio: doc.aspectRatio,
    rings: doc.rings.map((r) => ({ name: r.name, center: r.center, normal: r.normal, radius: r.radius, tube: r.tube })),
    ratio: doc.ratio,
    samples: doc.samples,
    pairs: doc.rings.flatMap((r) =>
      r.neighbours.map((n) => ({
        ring: r.name,
        neighbour: n.name,
        linking: n.linking,
        contacts: n.contacts.length,
        tracks: n.tracks.length,
        kind: n.motion.kind,
        pitch: n.motion.pitch,
        angularSpeed: n.motion.angularSpeed,
        plainRotation: n.motion.plainRotation,
        shaftAngle: n.motion.shaftAngle,
        axisOffset: n.motion.axisOffset,
      })),
    ),
  };
}

function toText(doc: TracksDocument, output: string, bytes: number): string {
  const u = doc.units ?? 'layout units';
  const L: string[] = [];
  L.push(`tracks of ${doc.source ?? 'result'} (lengths in ${u}, angles in degrees here and radians in the file)`);
  L.push(`ratio ${doc.ratio[0]}:${doc.ratio[1]} (turns of the first ring of each pair : the second, per period); ${doc.samples} samples per curve and per period`);
  for (const r of doc.rings) {
    if (r.neighbours.length === 0) {
      L.push(`ring ${r.name}: no touching or linked neighbours`);
      continue;
    }
    for (const n of r.neighbours) {
      const m = n.motion;
      const link = n.linking === null ? '' : n.linking !== 0 ? ', linked' : ', not linked';
      L.push(`ring ${r.name} / ${n.name}${link}: ${n.contacts.length} contact point(s) on ${n.tracks.length} track circle(s)`);
      for (const c of n.contacts.slice(0, 6)) {
        L.push(`    contact at core angle ${deg(c.coreAngle)} deg, tube angle ${deg(c.tubeAngle)} deg, gap ${g(c.gap, doc.tube)} ${u}${c.continuum ? ' (one of a continuum)' : ''}`);
      }
      if (n.contacts.length > 6) L.push(`    ... ${n.contacts.length - 6} more in the file`);
      const axes = `shaft angle ${deg(m.shaftAngle)} deg, axis offset ${g(m.axisOffset, r.radius)} ${u}`;
      if (m.kind === 'identity') L.push(`    relative motion: none (identity); ${axes}`);
      else if (m.kind === 'translation') L.push(`    relative motion: circular translation, no turning (dimensionless speed ratio 1:1); ${axes}`);
      else {
        L.push(
          `    relative motion: ${m.plainRotation ? 'plain rotation about a fixed axis' : m.kind === 'rotation' ? 'rotation about an axis that turns with this ring' : 'screw'}, ` +
            `angular speed ${g(m.angularSpeed)} rad per unit time, pitch ${g(m.pitch ?? 0)} ${u} per radian; ${axes}`,
        );
      }
    }
  }
  L.push(`wrote ${output} (${bytes} bytes, format ${doc.format})`);
  return L.join('\n');
}

/** Relative size below which a length is rounding noise (a gap of 3e-16 at a tube of 0.3 is a touch). */
const DISPLAY_ZERO_REL = 1e-9;

// Angles to 0.1 degree; -0.0 shown as 0.0.
export function deg(rad: number): string {
  const d = Number((rad * 180 / Math.PI).toFixed(1));
  return (d === 0 ? 0 : d).toFixed(1);
}

// Five significant figures; a value below 1e-9 of the scale it belongs to is shown as 0.
export function g(x: number, scale = 0): string {
  if (Math.abs(x) <= DISPLAY_ZERO_REL * Math.abs(scale)) return '0';
  return Number(x.toPrecision(5)).toString();
}
