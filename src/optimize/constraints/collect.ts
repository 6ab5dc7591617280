// Gather the constraints of the local model at the chart's base pose: the kernel's struts of every pair
// within reach of the trust region, sampled point-to-circle constraints along near-touching arcs, the
// radius limit and the departure bound.
import { pairSupport, type Chart, type Posed } from '../chart/chart.js';
import { evaluate, newConstraint, type Constraint, type DepartureSpec } from './constraints.js';
import type { PairScan } from './scan.js';

/** Points per ring sampled for near-continuum contacts. */
export const SAMPLES_PER_RING = 16;
/** Samples closer than this (relative to ring a's radius) to ring a's axis are left out. */
const SAMPLE_AXIS_REL = 0.01;
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
  const probe = newConstraint('sample', 0, 0, 0, 0, 0, 0, true);
  const supports = new Map<number, Int32Array>();
  const support = (a: number, b: number): Int32Array => {
    const key = Math.min(a, b) * chart.n + Math.max(a, b);
    let s = supports.get(key);
    if (s === undefined) supports.set(key, (s = pairSupport(chart, a, b)));
    return s;
  };
  for (const scan of scans) {
    if (scan.distance - opt.t * scan.c > opt.margin) continue;
    for (const k of scan.contacts) {
      if (k.d - opt.t * scan.c > opt.margin) continue;
      const con = newConstraint('strut', scan.a, scan.b, k.ta, k.tb, scan.c, nFree, scan.continuum !== null);
      con.support = support(scan.a, scan.b);
      if (Number.isFinite(evaluate(con, chart, posed, true, opt.dep))) out.push(con);
    }
    if (!opt.samples) continue;
    // Only near-touching arcs: samples beside an isolated strut repeat it and only enlarge the model.
    const sampleMargin = Math.min(opt.margin, SAMPLE_SLACK_REL * opt.t * scan.c);
    for (const [a, b] of [[scan.a, scan.b], [scan.b, scan.a]] as const) {
      for (let k = 0; k < SAMPLES_PER_RING; k++) {
        const th = (2 * Math.PI * (k + 0.5)) / SAMPLES_PER_RING;
        // The value first, on a shared row without a gradient; most samples are left out, and a gradient is
        // a row as long as the chart (allocating one per sample dominated the collection on long chains).
        probe.a = a;
        probe.b = b;
        probe.ta = 0;
        probe.tb = th;
        probe.c = scan.c;
        const g = evaluate(probe, chart, posed, false, opt.dep);
        // Near ring a's axis the nearest point on a jumps (on the axis all of a is equally near): the
        // sample's distance is not smooth there, so leave it out (it is only an extra, redundant bound).
        if (!Number.isFinite(g) || g - opt.t * scan.c > sampleMargin) continue;
        if (axisDistance(posed, a, probe.pb) < SAMPLE_AXIS_REL * posed.R[a]!) continue;
        const con = newConstraint('sample', a, b, 0, th, scan.c, nFree, true);
        con.support = support(a, b);
        evaluate(con, chart, posed, true, opt.dep);
        out.push(con);
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

/** Distance of point p from the axis of ring j. */
function axisDistance(posed: Posed, j: number, p: ArrayLike<number>): number {
  const o = 3 * j;
  let dz = 0;
  const d = [0, 1, 2].map((k) => p[k]! - posed.c[o + k]!);
  for (let k = 0; k < 3; k++) dz += d[k]! * posed.n[o + k]!;
  return Math.hypot(d[0]! - dz * posed.n[o]!, d[1]! - dz * posed.n[o + 1]!, d[2]! - dz * posed.n[o + 2]!);
}

/**
 * The active set for the polish and the certificate: constraints with slack <= tol. A continuum of closest
 * pairs of two round circles is always a whole circle (the distance along a ring is analytic, so constant
 * on an arc means constant everywhere: coaxial circles, or a circle on the other's tube), so a ring side
 * touches along a continuum exactly when all its samples are active. Such a pair keeps those samples and
 * drops its struts, whose tracking is ill-conditioned there; every other pair keeps its struts only.
 */
export function activeSet(cons: readonly Constraint[], t: number, tol: number): Constraint[] {
  const active = cons.filter((k) => k.g - k.c * t <= tol);
  const perSide = new Map<string, number>();
  for (const k of active) {
    if (k.kind !== 'sample') continue;
    const key = `${k.a}>${k.b}`;
    perSide.set(key, (perSide.get(key) ?? 0) + 1);
  }
  // All samples of the side active (up to two may have been left out beside the other ring's axis, which
  // a ring on the other's tube runs along where it passes through the other's centre).
  const arcSide = (a: number, b: number): boolean => (perSide.get(`${a}>${b}`) ?? 0) >= SAMPLES_PER_RING - 2;
  return active.filter((k) => {
    if (k.kind === 'sample') return arcSide(k.a, k.b);
    if (k.kind === 'strut') return !arcSide(k.a, k.b) && !arcSide(k.b, k.a);
    return true;
  });
}
