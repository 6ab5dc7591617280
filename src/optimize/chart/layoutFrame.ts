// The solver's working frame: the layout moved to the origin and measured in units of its largest core radius.
//
// Thickness is invariant under rigid motions and scales linearly under dilations (Gonzalez & Maddocks,
// PNAS 96, 1999; Cantarella, Kusner & Sullivan, Invent. Math. 150, 2002), so the optimum in the working frame,
// mapped back, is the optimum of the layout as given. Working there keeps every tolerance of the solver
// (trust region, active set, polish, certificate) relative to the same magnitudes whatever the units, and it
// keeps coordinates small: a layout 5·10⁴ away from the origin otherwise loses log10(5·10⁴ / R) digits of
// every contact distance to the rounding of its centres.
//
// Mapping back multiplies by the unit, which can round the tube one ulp above a bound it attains. The reported
// tube is therefore capped by the bounds proven in the original frame (r_i <= R_i, and the packing bound of
// bound.ts): a tube at most an ulp lower is still feasible, and the independent check (src/check/verify.ts)
// runs on the mapped-back rings in the original frame, as for every result.
import type { Ring, Symmetry, Vec3 } from '../../model/types.js';
import { packingBound } from '../certify/bound.js';
import type {
  InflateProblem, PeriodicContact, PeriodicOutcome, PeriodicProblem, SolveOptions, SolveOutcome,
} from '../run/problem.js';

export interface LayoutFrame {
  /** The original-frame point that becomes the origin (layout units). */
  origin: Vec3;
  /** Original-frame length of one working unit: the largest core radius (layout units). */
  unit: number;
}

/**
 * The frame of a layout: centred on the symmetry origin when a symmetry is imposed or bounded (so the group
 * keeps acting about the working origin exactly), else on the centroid of the centres; unit the largest radius.
 */
export function layoutFrame(rings: readonly Ring[], symmetry: Symmetry | null = null): LayoutFrame {
  let unit = 0;
  for (const r of rings) unit = Math.max(unit, r.radius);
  if (!(unit > 0) || !Number.isFinite(unit)) unit = 1;
  if (symmetry) return { origin: [symmetry.origin[0], symmetry.origin[1], symmetry.origin[2]], unit };
  const n = Math.max(1, rings.length);
  const o: Vec3 = [0, 0, 0];
  for (const r of rings) for (let k = 0; k < 3; k++) o[k] += r.center[k]! / n;
  return { origin: o, unit };
}

export function pointIn(f: LayoutFrame, p: ArrayLike<number>): Vec3 {
  return [(p[0]! - f.origin[0]) / f.unit, (p[1]! - f.origin[1]) / f.unit, (p[2]! - f.origin[2]) / f.unit];
}

export function pointOut(f: LayoutFrame, p: ArrayLike<number>): Vec3 {
  return [f.origin[0] + p[0]! * f.unit, f.origin[1] + p[1]! * f.unit, f.origin[2] + p[2]! * f.unit];
}

export function ringsIn(f: LayoutFrame, rings: readonly Ring[]): Ring[] {
  return rings.map((r) => {
    const out: Ring = { name: r.name, center: pointIn(f, r.center), normal: [r.normal[0], r.normal[1], r.normal[2]], radius: r.radius / f.unit };
    if (r.tube !== undefined) out.tube = r.tube / f.unit;
    return out;
  });
}

export function ringsOut(f: LayoutFrame, rings: readonly Ring[], tube: number, ratios: readonly number[], original: readonly Ring[]): Ring[] {
  // Core radii are fixed by the problem: hand back the caller's exactly, not their round trip.
  return rings.map((r, i) => ({
    name: r.name, center: pointOut(f, r.center), normal: [r.normal[0], r.normal[1], r.normal[2]],
    radius: original[i]?.radius ?? r.radius * f.unit, tube: tube * (ratios[i] ?? 1),
  }));
}

/** The ring problem in the working frame (the symmetry origin moves; the axis is a direction and does not). */
export function inflateProblemIn(f: LayoutFrame, p: InflateProblem): InflateProblem {
  const out: InflateProblem = {
    rings: ringsIn(f, p.rings), tubeRatios: p.tubeRatios, linking: p.linking,
    symmetry: p.symmetry ? symmetryIn(f, p.symmetry) : null,
  };
  // The departure from symmetry is a length (centres, and normals weighted by R): it scales with the layout.
  if (p.departure) {
    const { symmetry, epsilon, reference } = p.departure;
    out.departure = { symmetry: symmetryIn(f, symmetry), epsilon: epsilon / f.unit, ...(reference ? { reference: ringsIn(f, reference) } : {}) };
  }
  return out;
}

export function periodicProblemIn(f: LayoutFrame, p: PeriodicProblem): PeriodicProblem {
  return {
    rings: ringsIn(f, p.rings), tubeRatios: p.tubeRatios, links: p.links,
    lattice: { vectors: p.lattice.vectors.map((v) => [v[0] / f.unit, v[1] / f.unit, v[2] / f.unit] as Vec3) },
  };
}

/** Options in the working frame: tolerances are relative already; progress reports tubes in layout units. */
export function optionsIn(f: LayoutFrame, o: SolveOptions): SolveOptions {
  const cb = o.onIteration;
  return cb ? { ...o, onIteration: (iteration, tube) => cb(iteration, tube * f.unit) } : { ...o };
}

/** A ring outcome back in the original frame, its tube capped by the bounds proven there. */
export function inflateOutcomeOut(f: LayoutFrame, o: SolveOutcome, p: InflateProblem): SolveOutcome {
  const cap = tubeCap(p.rings, p.tubeRatios, p.linking);
  return outcomeOut(f, o, p.rings, p.tubeRatios, cap);
}

export function periodicOutcomeOut(f: LayoutFrame, o: PeriodicOutcome, p: PeriodicProblem): PeriodicOutcome {
  // A weave has no packing bound here (its links are image pairs); the radius limit still holds.
  const base = outcomeOut(f, o, p.rings, p.tubeRatios, radiusCap(p.rings, p.tubeRatios));
  return {
    ...base,
    lattice: { vectors: o.lattice.vectors.map((v) => [v[0] * f.unit, v[1] * f.unit, v[2] * f.unit] as Vec3) },
    contacts: o.contacts.map((c, k) => ({ ...(base.contacts[k] as PeriodicContact), shift: c.shift.slice() })),
  };
}

/** The largest tube the original problem allows: radius limit and, for a ring link, the packing bound. */
export function tubeCap(rings: readonly Ring[], ratios: readonly number[], linking: number[][]): number {
  const bound = packingBound(rings as Ring[], ratios as number[], linking)?.tube ?? Infinity;
  return Math.min(radiusCap(rings, ratios), bound);
}

// ---- helpers -------------------------------------------------------------------------------------

function symmetryIn(f: LayoutFrame, s: Symmetry): Symmetry {
  return { ...s, axis: [s.axis[0], s.axis[1], s.axis[2]], origin: pointIn(f, s.origin) };
}

function radiusCap(rings: readonly Ring[], ratios: readonly number[]): number {
  let t = Infinity;
  rings.forEach((r, i) => { t = Math.min(t, r.radius / (ratios[i] ?? 1)); });
  return t;
}

function outcomeOut<O extends SolveOutcome>(f: LayoutFrame, o: O, original: readonly Ring[], ratios: readonly number[], cap: number): SolveOutcome {
  const back = (t: number): number => Math.min(t * f.unit, cap);
  const tube = back(o.tube);
  // The message quotes the working-frame tube; quote the reported one instead.
  const message = o.message.split(`tube ${o.tube} `).join(`tube ${tube} `);
  const out: SolveOutcome = {
    status: o.status, tube, rings: ringsOut(f, o.rings, tube, ratios, original), iterations: o.iterations,
    history: o.history.map(back),
    contacts: o.contacts.map((c) => ({ ...c, onA: pointOut(f, c.onA), onB: pointOut(f, c.onB), distance: c.distance * f.unit })),
    certificate: { ...o.certificate }, message,
  };
  if (o.stopReason !== undefined) out.stopReason = o.stopReason;
  return out;
}
