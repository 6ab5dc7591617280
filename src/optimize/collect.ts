// Gather the constraints of the local model at the chart's base pose: the kernel's struts of every pair
// within reach of the trust region, sampled point-to-circle constraints along near-touching arcs, the
// radius limit and the departure bound.
import type { Chart, Posed } from './chart.js';
import { evaluate, newConstraint, type Constraint, type DepartureSpec } from './constraints.js';
import type { PairScan } from './scan.js';

/** Points per ring sampled for near-continuum contacts. */
export const SAMPLES_PER_RING = 16;
/** Samples with slack above this fraction of the pair's touching distance are left out. */
const SAMPLE_SLACK_REL = 0.02;

export interface CollectOptions {
  t: number;
  /** Constraints with slack g - c t above this (layout units) are left out. */
  margin: number;
  w: readonly number[];
  dep: DepartureSpec | null;
  /** Include sampled constraints (the polish and certificate choose per pair between samples and struts). */
  samples: boolean;
}

export function collectConstraints(chart: Chart, posed: Posed, scans: readonly PairScan[], opt: CollectOptions): Constraint[] {
  const out: Constraint[] = [];
  const nFree = chart.nFree;
  for (const scan of scans) {
    if (scan.distance - opt.t * scan.c > opt.margin) continue;
    for (const k of scan.contacts) {
      if (k.d - opt.t * scan.c > opt.margin) continue;
      const con = newConstraint('strut', scan.a, scan.b, k.ta, k.tb, scan.c, nFree, scan.continuum !== null);
      if (Number.isFinite(evaluate(con, chart, posed, true, opt.dep))) out.push(con);
    }
    if (!opt.samples) continue;
    // Only near-touching arcs: samples beside an isolated strut repeat it and only enlarge the model.
    const sampleMargin = Math.min(opt.margin, SAMPLE_SLACK_REL * opt.t * scan.c);
    for (const [a, b] of [[scan.a, scan.b], [scan.b, scan.a]] as const) {
      for (let k = 0; k < SAMPLES_PER_RING; k++) {
        const th = (2 * Math.PI * (k + 0.5)) / SAMPLES_PER_RING;
        const con = newConstraint('sample', a, b, 0, th, scan.c, nFree, true);
        const g = evaluate(con, chart, posed, true, opt.dep);
        if (Number.isFinite(g) && g - opt.t * scan.c <= sampleMargin) out.push(con);
      }
    }
  }
  // The tightest radius limit t·w_i <= R_i (the others are implied).
  let best = -1, lim = Infinity;
  for (let i = 0; i < opt.w.length; i++) {
    const v = posed.R[i]! / opt.w[i]!;
    if (v < lim) {
      lim = v;
      best = i;
    }
  }
  if (best >= 0 && lim - opt.t <= opt.margin) {
    const con = newConstraint('radius', best, best, 0, 0, 1, nFree);
    con.g = lim;
    out.push(con);
  }
  if (opt.dep) {
    const con = newConstraint('departure', 0, 0, 0, 0, 0, nFree);
    const g = evaluate(con, chart, posed, true, opt.dep);
    if (Number.isFinite(g) && g <= opt.margin) out.push(con);
  }
  return out;
}

/**
 * The active set for the polish and the certificate: constraints with slack <= tol. A pair with three or
 * more active samples touches along an arc (a continuum): it keeps its samples and drops its struts, whose
 * tracking is ill-conditioned there. Any other pair keeps its struts only.
 */
export function activeSet(cons: readonly Constraint[], t: number, tol: number): Constraint[] {
  const active = cons.filter((k) => k.g - k.c * t <= tol);
  const samplesPerPair = new Map<string, number>();
  for (const k of active) {
    if (k.kind !== 'sample') continue;
    const key = pairKey(k.a, k.b);
    samplesPerPair.set(key, (samplesPerPair.get(key) ?? 0) + 1);
  }
  return active.filter((k) => {
    if (k.kind !== 'strut' && k.kind !== 'sample') return true;
    const arc = (samplesPerPair.get(pairKey(k.a, k.b)) ?? 0) >= 3;
    return k.kind === 'sample' ? arc : !arc;
  });
}

function pairKey(a: number, b: number): string {
  return a < b ? `${a}:${b}` : `${b}:${a}`;
}
