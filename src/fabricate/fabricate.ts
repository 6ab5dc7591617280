// The fabricate job as data: plan the printed sizes, mesh every printed ring, check the meshes and
// encode the requested formats in memory. The caller writes files only after all of this succeeded.
import type { SolveResult } from '../model/result.js';
import { CAUTIONS } from './cautions.js';
import { checkMeshes, type MeshReport } from './meshCheck.js';
import { encodeObj } from './obj.js';
import { planFabrication, type FabricationPlan, type PlanOptions } from './plan.js';
import { PRESET_NOTE } from './presets.js';
import { encodeStl } from './stl.js';
import { encode3mf } from './threeMf.js';
import { checkMeshBudget, torusMesh, torusSegments, type MeshBody, type Segments, type Torus } from './torusMesh.js';

export type MeshFormat = 'stl' | 'obj' | '3mf';

export interface FabricateOptions extends PlanOptions {
  /** Chord tolerance of the meshes (mm). */
  chord?: number;
  /** Formats to encode; meshes are built and checked only when this is non-empty. */
  formats?: readonly MeshFormat[];
  /** Largest mesh built (triangles over all bodies), default MAX_TRIANGLES; checked before anything is built. */
  maxTriangles?: number;
}

export interface MeshSummary {
  chord: number;
  segments: (Segments & { name: string })[];
  triangles: number;
  check: MeshReport;
}

export interface FabricateOutput {
  plan: FabricationPlan;
  mesh: MeshSummary | null;
  /** Encoded files by format (not yet written). */
  files: Partial<Record<MeshFormat, Uint8Array>>;
  presetNote: string;
  /** Ring pairs that touch at the optimum (from the result's contacts), "A-B"; a copy in another cell as "A-B[0,1]". */
  touchingPairs: string[];
  /** A weave cell result: what the sizes are of (null for a finite link or a block of cells). */
  weave: WeaveSummary | null;
  cautions: readonly string[];
  warnings: string[];
}

export interface WeaveSummary {
  kind: string;
  cellRings: number;
  lattice: number[][];
}

/** Default chord tolerance (mm): well below every process's clearance and resolution. */
export const DEFAULT_CHORD = 0.01;

export function fabricate(result: SolveResult, options: FabricateOptions): FabricateOutput {
  const plan = planFabrication(result, options);
  const chord = options.chord ?? DEFAULT_CHORD;
  const formats = options.formats ?? [];
  const tori: Torus[] = plan.rings.map((r) => ({ name: r.name, center: r.center, normal: r.normal, radius: r.radius, tube: r.printedTube }));
  // Validate the chord even without meshes, so a bad flag is reported the same way every time.
  checkMeshBudget(formats.length ? tori : [], chord, options.maxTriangles);
  const warnings = [...plan.warnings];
  if (plan.clearance > 0 && chord > plan.clearance / 2) {
    warnings.push(
      `WARNING: --chord ${chord} mm is more than half the clearance ${plan.clearance} mm: facets may eat into the gap; use a smaller chord`,
    );
  }
  let mesh: MeshSummary | null = null;
  const files: Partial<Record<MeshFormat, Uint8Array>> = {};
  if (formats.length) {
    const bodies: MeshBody[] = tori.map((t) => torusMesh(t, chord));
    const check = checkMeshes(bodies, { tori, clearance: plan.clearance, chord });
    dropOnPlate(bodies);
    mesh = {
      chord,
      segments: tori.map((t) => ({ name: t.name, ...torusSegments(t.radius, t.tube, chord) })),
      triangles: bodies.reduce((s, b) => s + b.triangles.length / 3, 0),
      check,
    };
    const topologyBad = check.bodies.some((b) => !b.closedOriented || b.euler !== 0 || !(b.volume > 0));
    // A torus mesh that is not a closed, outward, genus-1 surface is a bug here, not bad input.
    if (topologyBad) throw new Error(`mesh check failed: ${check.messages.join('; ')}`);
    for (const m of check.messages) warnings.push(`WARNING: ${m}`);
    for (const f of formats) {
      files[f] = f === 'stl' ? encodeStl(bodies) : f === 'obj' ? new TextEncoder().encode(encodeObj(bodies)) : encode3mf(bodies);
    }
  }
  return { plan, mesh, files, presetNote: PRESET_NOTE, touchingPairs: touchingPairs(result), weave: weaveSummary(result), cautions: CAUTIONS, warnings };
}

// The plan already puts the exact tori on the plate; facets sit inside the surface by up to the chord, so the
// lowest vertex is lowered onto z = 0 as well (a slicer starts the first layer at the lowest vertex).
function dropOnPlate(bodies: MeshBody[]): void {
  let low = Infinity;
  for (const b of bodies) for (let i = 2; i < b.positions.length; i += 3) low = Math.min(low, b.positions[i]!);
  for (const b of bodies) for (let i = 2; i < b.positions.length; i += 3) b.positions[i] = b.positions[i]! - low;
}

function touchingPairs(result: SolveResult): string[] {
  const shifts = (result as { periodic?: { contactShifts?: number[][] } }).periodic?.contactShifts;
  const out = new Set<string>();
  result.contacts.forEach((c, k) => {
    const sh = shifts?.[k];
    const shifted = sh !== undefined && sh.some((x) => x !== 0);
    const [a, b] = !shifted && c.b < c.a ? [c.b, c.a] : [c.a, c.b];
    out.add(`${result.rings[a]!.name}-${result.rings[b]!.name}${shifted ? `[${sh.join(',')}]` : ''}`);
  });
  return [...out];
}

function weaveSummary(result: SolveResult): WeaveSummary | null {
  const p = (result as { periodic?: { kind?: unknown; cellRings?: unknown; repeats?: unknown } }).periodic;
  if (!p || !result.lattice || p.repeats !== undefined) return null;
  return { kind: String(p.kind), cellRings: Number(p.cellRings), lattice: result.lattice.vectors.map((v) => [...v]) };
}
