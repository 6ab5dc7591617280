// `thickring fabricate RESULT`: scale an optimum to millimetres for a process, report wire and walls,
// and write checked meshes. Everything is validated and encoded before the first file is written.
import { statSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import type { Command } from 'commander';
import { CAUTION_TEXT } from '../src/fabricate/cautions.js';
import { gaugeRange, parseWire, type WireSpec } from '../src/fabricate/gauge.js';
import { MATERIALS, resolveSpringBack } from '../src/fabricate/materials.js';
import { DEFAULT_CHORD, fabricate, type FabricateOutput, type MeshFormat } from '../src/fabricate/fabricate.js';
import { flagOf, type SizeOption } from '../src/fabricate/plan.js';
import { isProcessName, PROCESS_NAMES } from '../src/fabricate/presets.js';
import { MAX_TRIANGLES, MAX_TRIANGLES_HARD, parseMaxTriangles } from '../src/fabricate/torusMesh.js';
import { InputError } from '../src/model/errors.js';
import { readResultFile } from '../src/model/resultFile.js';
import { writeFilesAtomic } from './files.js';
import { emit, type Io } from './io.js';

interface FabricateFlags {
  coreRadius?: string;
  innerDiameter?: string;
  outerDiameter?: string;
  wire?: string;
  mandrel?: string;
  material?: string;
  springBack?: string;
  allowThin?: boolean;
  process?: string;
  clearance?: string;
  minWall?: string;
  chord?: string;
  maxTriangles?: string;
  stl?: string;
  obj?: string;
  '3mf'?: string;
  json?: boolean;
}

export function register(program: Command, io: Io): void {
  program
    .command('fabricate')
    .description('Scale a result (rings or a weave cell) to millimetres for a process (fdm, sla, sls or wire): wire and gauges, mandrels, clearance, walls and meshes on the build plate.')
    .argument('<result>', 'Result file (format thickring-result/1).')
    .option('--core-radius <mm>', 'Core radius of the largest ring, in mm.')
    .option('--inner-diameter <mm>', 'Inner diameter of the largest finished ring, in mm.')
    .option('--outer-diameter <mm>', 'Outer diameter of the largest finished ring, in mm.')
    .option('--wire <mm|gauge>', 'Wire you own: a diameter in mm (1.6) or a gauge (16swg, 18awg); implies --process wire.')
    .option('--mandrel <mm>', 'Mandrel diameter in mm: gives the thickest wire for rings wound on it; implies --process wire.')
    .option('--material <name>', `Wire metal for the spring-back rule of thumb: ${MATERIALS.map((m) => m.name).join(', ')}.`)
    .option('--spring-back <pct>', 'Inner diameter growth over the mandrel, in percent; overrides --material.')
    .option('--process <name>', `Fabrication process: ${PROCESS_NAMES.join(', ')}.`)
    .option('--clearance <mm>', 'Gap between facing ring surfaces, in mm (default: the process preset).')
    .option('--min-wall <mm>', 'Minimum printable wire diameter, in mm (default: the process preset).')
    .option('--allow-thin', 'Make the part even when the wire is below the minimum wall (a warning instead of an error).')
    .option('--chord <mm>', `Mesh chord tolerance, the largest gap between facet and surface, in mm (default ${DEFAULT_CHORD}).`)
    .option('--max-triangles <n>', `Largest mesh to build, in triangles over all rings (default ${MAX_TRIANGLES}, at most ${MAX_TRIANGLES_HARD}).`)
    .option('--stl <file>', 'Write a binary STL mesh in mm, placed on the build plate.')
    .option('--obj <file>', 'Write an OBJ mesh in mm, one object per ring, placed on the build plate.')
    .option('--3mf <file>', 'Write a 3MF package in mm: one object made of one component per ring, as one build item.')
    .option('--json', 'Print one JSON object.')
    .action((resultPath: string, flags: FabricateFlags) => {
      run(resultPath, flags, io);
    });
}

function run(resultPath: string, flags: FabricateFlags, io: Io): void {
  // Validate every flag, the result file and the output folders before writing anything.
  const wireSpec = flags.wire !== undefined ? parseWire(flags.wire) : null;
  const size = sizeOption(flags, wireSpec);
  const wireImplied = size.kind === 'wire' || size.kind === 'mandrel';
  if (flags.process === undefined && !wireImplied) throw new InputError(`--process is required: one of ${PROCESS_NAMES.join(', ')} (or give --wire / --mandrel for wire rings)`);
  const process = (flags.process ?? 'wire').toLowerCase();
  if (!isProcessName(process)) {
    throw new InputError(`--process '${flags.process}' is not known: use one of ${PROCESS_NAMES.join(', ')}`);
  }
  const clearance = optionalMm(flags.clearance, '--clearance', true);
  const minWall = optionalMm(flags.minWall, '--min-wall', true);
  const chord = optionalMm(flags.chord, '--chord', false);
  if ((flags.material !== undefined || flags.springBack !== undefined) && process !== 'wire') {
    throw new InputError(`--${flags.material !== undefined ? 'material' : 'spring-back'} applies to wire rings: use --process wire, --wire or --mandrel`);
  }
  const springBack = process === 'wire' ? resolveSpringBack(flags.material, flags.springBack) : undefined;
  const outputs: [MeshFormat, string][] = [];
  if (flags.stl !== undefined) outputs.push(['stl', flags.stl]);
  if (flags.obj !== undefined) outputs.push(['obj', flags.obj]);
  if (flags['3mf'] !== undefined) outputs.push(['3mf', flags['3mf']]);
  checkOutputs(outputs, resultPath);
  const result = readResultFile(resultPath);

  const out = fabricate(result, {
    size,
    process,
    ...(clearance !== undefined ? { clearance } : {}),
    ...(minWall !== undefined ? { minWall } : {}),
    ...(chord !== undefined ? { chord } : {}),
    ...(flags.maxTriangles !== undefined ? { maxTriangles: parseMaxTriangles(flags.maxTriangles) } : {}),
    ...(springBack !== undefined ? { springBack } : {}),
    ...(flags.allowThin === true ? { allowThin: true } : {}),
    formats: outputs.map(([f]) => f),
  });

  const written: { format: MeshFormat; path: string; bytes: number }[] = [];
  for (const [format, path] of outputs) written.push({ format, path, bytes: out.files[format]!.length });
  // All meshes or none: a second file that cannot be written must not leave the first one replaced.
  writeFilesAtomic(outputs.map(([format, path]) => [path, out.files[format]!] as const));
  // Text mode prints warnings in the report; with --json they also go to stderr so a person sees them.
  if (flags.json === true) for (const w of out.warnings) io.err(w);
  emit(io, flags.json === true, toJson(resultPath, out, written, wireSpec), () => toText(resultPath, out, written, wireSpec));
}

function sizeOption(flags: FabricateFlags, wire: WireSpec | null): SizeOption {
  const given: SizeOption[] = [];
  if (wire) given.push({ kind: 'wire', value: wire.diameter });
  if (flags.mandrel !== undefined) given.push({ kind: 'mandrel', value: mm(flags.mandrel, '--mandrel') });
  if (flags.coreRadius !== undefined) given.push({ kind: 'coreRadius', value: mm(flags.coreRadius, '--core-radius') });
  if (flags.innerDiameter !== undefined) given.push({ kind: 'innerDiameter', value: mm(flags.innerDiameter, '--inner-diameter') });
  if (flags.outerDiameter !== undefined) given.push({ kind: 'outerDiameter', value: mm(flags.outerDiameter, '--outer-diameter') });
  if (given.length !== 1) {
    const names = given.map(flagOf).join(' and ');
    throw new InputError(
      given.length === 0
        ? 'give exactly one size: --core-radius, --inner-diameter or --outer-diameter (mm, of the largest ring), or --wire / --mandrel for wire rings'
        : `${names} were both given: give exactly one size option (mm)`,
    );
  }
  const s = given[0]!;
  if (!(s.value > 0)) throw new InputError(`${flagOf(s)} ${s.value} must be > 0 (mm): give the size of the largest ring in millimetres`);
  return s;
}

function mm(text: string, flag: string): number {
  const v = Number(text);
  if (text.trim() === '' || !Number.isFinite(v)) throw new InputError(`${flag} '${text}' must be a number of millimetres`);
  return v;
}

function optionalMm(text: string | undefined, flag: string, zeroOk: boolean): number | undefined {
  if (text === undefined) return undefined;
  const v = mm(text, flag);
  if (zeroOk ? v < 0 : v <= 0) throw new InputError(`${flag} ${v} must be ${zeroOk ? '>= 0' : '> 0'} (mm)`);
  return v;
}

function checkOutputs(outputs: [MeshFormat, string][], resultPath: string): void {
  const seen = new Set<string>([resolve(resultPath)]);
  for (const [format, path] of outputs) {
    const full = resolve(path);
    if (seen.has(full)) throw new InputError(`--${format} '${path}' is the same file as another input or output: give each file its own name`);
    seen.add(full);
    let isDir = false;
    try {
      isDir = statSync(dirname(full)).isDirectory();
    } catch {
      isDir = false;
    }
    if (!isDir) throw new InputError(`--${format} '${path}': folder '${dirname(path)}' does not exist: create it or choose another path`);
  }
}

function toJson(source: string, out: FabricateOutput, written: { format: MeshFormat; path: string; bytes: number }[], wire: WireSpec | null): unknown {
  const p = out.plan;
  return {
    command: 'fabricate',
    source,
    status: p.status,
    units: p.units,
    process: p.process.name,
    preset: p.process,
    presetNote: out.presetNote,
    scale: p.scale,
    sizedRing: p.rings[p.sizedRing]!.name,
    size: { option: flagOf(p.size), value: p.size.value },
    clearance: p.clearance,
    minWall: p.minWall,
    tube: p.tube,
    rings: p.rings,
    largestWireDiameter: p.largestWireDiameter,
    largestPrintedWireDiameter: p.largestPrintedWireDiameter,
    thinnestRing: p.rings[p.thinnestRing]!.name,
    thinnestPrintedWireDiameter: p.thinnestPrintedWireDiameter,
    aspectRatio: p.aspectRatio,
    aspectRatioRing: p.aspectRatioRing,
    placement: p.placement,
    minWallMet: p.minWallMet,
    minWallMarginal: p.minWallMarginal,
    wire: p.wire === null ? null : {
      given: wire ? { text: wire.text, diameter: wire.diameter, gauge: wire.gauge?.label ?? null } : null,
      mandrel: p.size.kind === 'mandrel' ? p.size.value : null,
      springBack: p.springBack,
      sizes: p.wire,
    },
    touchingPairs: out.touchingPairs,
    weave: out.weave,
    mesh: out.mesh,
    files: written,
    warnings: out.warnings,
    cautions: out.cautions,
  };
}

function toText(source: string, out: FabricateOutput, written: { format: MeshFormat; path: string; bytes: number }[], wire: WireSpec | null): string {
  const p = out.plan;
  const pr = p.process;
  const isWire = pr.name === 'wire';
  const made = isWire ? 'finished' : 'printed';
  const sized = p.rings[p.sizedRing]!;
  const L: string[] = [];
  L.push(`fabricate ${source} for ${pr.label} (result status: ${p.status})`);
  if (out.weave) L.push(`weave cell: ${out.weave.kind}, ${out.weave.cellRings} rings per cell; sizes below are of the cell's rings`);
  if (out.touchingPairs.length > 0) L.push(`touching at the optimum: ${listNames(out.touchingPairs)}`);
  const by = p.size.kind === 'wire'
    ? `--wire ${wire?.gauge ? `${wire.gauge.label} (${f(p.size.value)} mm)` : `${f(p.size.value)} mm`} on ring ${sized.name} (the thickest wire)`
    : p.size.kind === 'mandrel'
      ? `--mandrel ${f(p.size.value)} mm on ring ${sized.name} (the largest), inner diameter ${f(sized.innerDiameter)} mm after ${f(p.springBack?.percent ?? 0)} % spring-back`
      : `${flagOf(p.size)} ${f(p.size.value)} mm on ring ${sized.name} (the largest; sizes are of the ${made} part)`;
  L.push(`scale: ${f(p.scale)} mm per layout unit, set by ${by}`);
  if (!isWire || p.clearance > 0) L.push(`clearance: ${f(p.clearance)} mm between facing surfaces (each tube shrunk by ${f(p.clearance / 2)} mm)`);
  if (!isWire || p.wire === null) {
    for (const r of p.rings) {
      L.push(
        `  ring ${r.name}: core radius ${f(r.radius)} mm, wire diameter ${f(r.wireDiameter)} mm -> ${made} ${f(r.printedWireDiameter)} mm, ` +
          `inner diameter ${f(r.innerDiameter)} mm, outer diameter ${f(r.outerDiameter)} mm, aspect ratio ${f(r.aspectRatio)} (dimensionless)`,
      );
    }
    L.push(`largest wire (tube) diameter: ${f(p.largestWireDiameter)} mm; printable after clearance: ${f(p.largestPrintedWireDiameter)} mm`);
  }
  L.push(`aspect ratio (inner diameter / wire diameter, smallest over the rings, ring ${p.aspectRatioRing}): ${f(p.aspectRatio)} (dimensionless)`);
  if (!isWire || p.minWall > 0) {
    const state = !p.minWallMet ? 'NOT met' : p.minWallMarginal ? `met, but marginal (common range ${pr.minWallRange[0]}-${pr.minWallRange[1]} mm)` : 'met';
    L.push(`minimum wall ${f(p.minWall)} mm: ${state} (thinnest ${made} wire ${f(p.thinnestPrintedWireDiameter)} mm)`);
  }
  if (p.wire) {
    const sb = p.springBack;
    if (sb) L.push(`spring-back: ${f(sb.percent)} % (${sb.source})`);
    if (p.size.kind === 'mandrel') {
      const g = p.wire.find((w) => w.rings.includes(sized.name))!;
      L.push(`thickest wire for a ${f(p.size.value)} mm mandrel: ${f(g.wireDiameter)} mm (${gaugeText(g)})`);
    }
    for (const g of p.wire) {
      const who = g.rings.length === 1 ? `ring ${g.rings[0]}` : `rings ${listNames(g.rings)} (${g.rings.length})`;
      L.push(`  ${who}: wire ${f(g.wireDiameter)} mm (${gaugeText(g)}), aspect ratio ${f(g.aspectRatio)}`);
      L.push(`    smallest inner diameter ${f(g.innerDiameter)} mm (geometric: aspect ratio x wire); mandrel ${f(g.mandrel)} mm without spring-back, ${f(g.mandrelWithSpringBack)} mm with ${f(sb?.percent ?? 0)} % spring-back`);
    }
    L.push('  Rings wound at the smallest inner diameter are jammed tight: a slightly larger mandrel gives them room to move.');
  }
  const range = isWire ? '' : ` (common ${pr.clearanceRange[0]}-${pr.clearanceRange[1]} mm clearance, ${pr.minWallRange[0]}-${pr.minWallRange[1]} mm walls)`;
  L.push(`preset ${pr.name}: clearance ${pr.clearance} mm, minimum wall ${pr.minWall} mm${range}; ${pr.note}`);
  L.push(out.presetNote);
  if (out.mesh) {
    const m = out.mesh;
    const segs = m.segments.map((s) => `${s.name} ${s.core}x${s.tube}`).join(', ');
    L.push(`meshes: chord ${f(m.chord)} mm, segments (around core x around tube) ${segs}, ${m.triangles} triangles; on the build plate (lowest z = 0 mm, centred in x, y)`);
    const c = m.check;
    const worstV = Math.max(...c.bodies.map((b) => Math.abs(b.volumeError ?? 0)));
    const worstA = Math.max(...c.bodies.map((b) => Math.abs(b.areaError ?? 0)));
    L.push(
      `mesh check: ${c.ok ? 'passed' : 'FAILED'} (closed, oriented, Euler 0, outward; volume within ${(100 * worstV).toFixed(3)} %, area within ${(100 * worstA).toFixed(3)} % of the torus formulas)` +
        (c.minGap !== null ? `; least gap between bodies ${f(c.minGap)} mm` : ''),
    );
    for (const w of written) L.push(`wrote ${w.path} (${w.format.toUpperCase()}, ${w.bytes} bytes)`);
  }
  for (const w of out.warnings) L.push(w);
  L.push(CAUTION_TEXT);
  return L.join('\n');
}

function gaugeText(g: { awg: { label: string; diameter: number } | null; swg: { label: string; diameter: number } | null; wireDiameter: number }): string {
  const one = (x: { label: string; diameter: number } | null, sys: 'AWG' | 'SWG'): string => {
    if (x) return `${x.label} ${f(x.diameter)} mm`;
    const [lo, hi] = gaugeRange(sys);
    return `outside ${sys} (${f(lo)}-${f(hi)} mm)`;
  };
  return `thickest gauges not over it: ${one(g.swg, 'SWG')}, ${one(g.awg, 'AWG')}`;
}

function listNames(names: string[]): string {
  return names.length <= 6 ? names.join(', ') : `${names.slice(0, 5).join(', ')}, ... ${names[names.length - 1]}`;
}

function f(x: number): string {
  return Number(x.toPrecision(5)).toString();
}
