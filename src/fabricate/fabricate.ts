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
  cautions: readonly string[];
  warnings: string[];
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
  return { plan, mesh, files, presetNote: PRESET_NOTE, cautions: CAUTIONS, warnings };
}
