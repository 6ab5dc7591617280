// `thickring fabricate RESULT`: scale an optimum to millimetres for a process, report wire and walls,
// and write checked meshes. Everything is validated and encoded before the first file is written.
import { statSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import type { Command } from 'commander';
import { CAUTION_TEXT } from '../src/fabricate/cautions.js';
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
    .description('scale a result to millimetres for a process (fdm, sla, sls, wire): wire diameter, clearance, walls, meshes')
    .argument('<result>', 'result file (format thickring-result/1)')
    .option('--core-radius <mm>', 'core radius of the largest ring (mm)')
    .option('--inner-diameter <mm>', 'inner diameter of the largest printed ring (mm)')
    .option('--outer-diameter <mm>', 'outer diameter of the largest printed ring (mm)')
    .option('--process <name>', `fabrication process: ${PROCESS_NAMES.join('|')}`)
    .option('--clearance <mm>', 'gap between facing ring surfaces (mm; default from the process preset)')
    .option('--min-wall <mm>', 'minimum printable wire diameter (mm; default from the process preset)')
    .option('--chord <mm>', `mesh chord tolerance: largest gap between facet and surface (mm, default ${DEFAULT_CHORD})`)
    .option('--max-triangles <n>', `largest mesh to build, triangles over all rings (default ${MAX_TRIANGLES}, at most ${MAX_TRIANGLES_HARD})`)
    .option('--stl <file>', 'write a binary STL mesh (mm)')
    .option('--obj <file>', 'write an OBJ mesh, one object per ring (mm)')
    .option('--3mf <file>', 'write a 3MF package, one object per ring (unit millimeter)')
    .option('--json', 'print one JSON object')
    .action((resultPath: string, flags: FabricateFlags) => {
      run(resultPath, flags, io);
    });
}

function run(resultPath: string, flags: FabricateFlags, io: Io): void {
  // Validate every flag, the result file and the output folders before writing anything.
  const size = sizeOption(flags);
  if (flags.process === undefined) throw new InputError(`--process is required: one of ${PROCESS_NAMES.join(', ')}`);
  const process = flags.process.toLowerCase();
  if (!isProcessName(process)) {
    throw new InputError(`--process '${flags.process}' is not known: use one of ${PROCESS_NAMES.join(', ')}`);
  }
  const clearance = optionalMm(flags.clearance, '--clearance', true);
  const minWall = optionalMm(flags.minWall, '--min-wall', true);
  const chord = optionalMm(flags.chord, '--chord', false);
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
    formats: outputs.map(([f]) => f),
  });

  const written: { format: MeshFormat; path: string; bytes: number }[] = [];
  for (const [format, path] of outputs) written.push({ format, path, bytes: out.files[format]!.length });
  // All meshes or none: a second file that cannot be written must not leave the first one replaced.
  writeFilesAtomic(outputs.map(([format, path]) => [path, out.files[format]!] as const));
  // Text mode prints warnings in the report; with --json they also go to stderr so a person sees them.
  if (flags.json === true) for (const w of out.warnings) io.err(w);
  emit(io, flags.json === true, toJson(resultPath, out, written), () => toText(resultPath, out, written));
}

function sizeOption(flags: FabricateFlags): SizeOption {
  const given: SizeOption[] = [];
  if (flags.coreRadius !== undefined) given.push({ kind: 'coreRadius', value: mm(flags.coreRadius, '--core-radius') });
  if (flags.innerDiameter !== undefined) given.push({ kind: 'innerDiameter', value: mm(flags.innerDiameter, '--inner-diameter') });
  if (flags.outerDiameter !== undefined) given.push({ kind: 'outerDiameter', value: mm(flags.outerDiameter, '--outer-diameter') });
  if (given.length !== 1) {
    const names = given.map(flagOf).join(' and ');
    throw new InputError(
      given.length === 0
        ? 'give exactly one size: --core-radius, --inner-diameter or --outer-diameter (mm, of the largest ring)'
        : `${names} were both given: give exactly one size option (mm, of the largest ring)`,
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

function toJson(source: string, out: FabricateOutput, written: { format: MeshFormat; path: string; bytes: number }[]): unknown {
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
    minWallMet: p.minWallMet,
    minWallMarginal: p.minWallMarginal,
    gauges: p.gauges,
    mesh: out.mesh,
    files: written,
    warnings: out.warnings,
    cautions: out.cautions,
  };
}

function toText(source: string, out: FabricateOutput, written: { format: MeshFormat; path: string; bytes: number }[]): string {
  const p = out.plan;
  const pr = p.process;
  const sized = p.rings[p.sizedRing]!;
  const L: string[] = [];
  L.push(`fabricate ${source} for ${pr.label} (result status: ${p.status})`);
  L.push(`scale: ${f(p.scale)} mm per layout unit, set by ${flagOf(p.size)} ${f(p.size.value)} mm on ring ${sized.name} (the largest; sizes are of the printed part)`);
  L.push(`clearance: ${f(p.clearance)} mm between facing surfaces (each tube shrunk by ${f(p.clearance / 2)} mm)`);
  for (const r of p.rings) {
    L.push(
      `  ring ${r.name}: core radius ${f(r.radius)} mm, wire diameter ${f(r.wireDiameter)} mm -> printed ${f(r.printedWireDiameter)} mm, ` +
        `inner diameter ${f(r.innerDiameter)} mm, outer diameter ${f(r.outerDiameter)} mm, aspect ratio ${f(r.aspectRatio)} (dimensionless)`,
    );
  }
  L.push(`largest wire (tube) diameter: ${f(p.largestWireDiameter)} mm; printable after clearance: ${f(p.largestPrintedWireDiameter)} mm`);
  L.push(`aspect ratio (inner diameter / wire diameter, thinnest-walled printed ring ${p.rings[p.thinnestRing]!.name}): ${f(p.aspectRatio)} (dimensionless)`);
  if (pr.name !== 'wire' || p.minWall > 0) {
    const state = !p.minWallMet ? 'NOT met' : p.minWallMarginal ? `met, but marginal (common range ${pr.minWallRange[0]}-${pr.minWallRange[1]} mm)` : 'met';
    L.push(`minimum wall ${f(p.minWall)} mm: ${state} (thinnest printed wire ${f(p.thinnestPrintedWireDiameter)} mm)`);
  }
  if (p.gauges) {
    p.gauges.forEach((g, i) => {
      const r = p.rings[i]!;
      L.push(
        g
          ? `  wire for ring ${r.name}: ${g.label} (${f(g.diameter)} mm) is the thickest AWG gauge not over ${f(r.printedWireDiameter)} mm`
          : `  wire for ring ${r.name}: ${f(r.printedWireDiameter)} mm is outside the AWG range (0.08-11.7 mm): use rod or sheet stock`,
      );
    });
  }
  const range = pr.name === 'wire' ? '' : ` (common ${pr.clearanceRange[0]}-${pr.clearanceRange[1]} mm clearance, ${pr.minWallRange[0]}-${pr.minWallRange[1]} mm walls)`;
  L.push(`preset ${pr.name}: clearance ${pr.clearance} mm, minimum wall ${pr.minWall} mm${range}; ${pr.note}`);
  L.push(out.presetNote);
  if (out.mesh) {
    const m = out.mesh;
    const segs = m.segments.map((s) => `${s.name} ${s.core}x${s.tube}`).join(', ');
    L.push(`meshes: chord ${f(m.chord)} mm, segments (around core x around tube) ${segs}, ${m.triangles} triangles`);
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

function f(x: number): string {
  return Number(x.toPrecision(5)).toString();
}
