// Gather the constraints of the local model at the chart's base pose: the kernel's struts of every pair
// within reach of the trust region, the radius limit, and on the ring chart also sampled point-to-circle
// constraints along near-touching arcs and the departure bound (the periodic chart has neither).
import { pairSupport, type Chart, type Posed } from '../chart/chart.js';
import type { PeriodicChart, PeriodicPosed } from '../chart/periodicChart.js';
import {
  evaluate, evaluatePeriodic, newConstraint, newPeriodicConstraint, type Constraint, type DepartureSpec, type PeriodicConstraint,
} from './constraints.js';
import type { PairScan, PeriodicScan } from './scan.js';

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
  const radius = radiusLimit(posed.R, opt, (i) => newConstraint('radius', i, i, 0, 0, 1, nFree));
  if (radius) out.push(radius);
  if (opt.dep) {
    const con = newConstraint('departure', 0, 0, 0, 0, 0, nFree);
    const g = evaluate(con, chart, posed, true, opt.dep);
    if (Number.isFinite(g) && g <= opt.margin) out.push(con);
  }
  return out;
}

/** Struts of the periodic chart (cell ring to image) within opt.margin of touching, and the radius limit. */
export function collectPeriodicConstraints(
  pc: PeriodicChart, pp: PeriodicPosed, scans: readonly PeriodicScan[], opt: { t: number; margin: number; w: readonly number[] },
): PeriodicConstraint[] {
  const out: PeriodicConstraint[] = [];
  for (const s of scans) {
    if (s.distance - opt.t * s.c > opt.margin) continue;
    for (const k of s.contacts) {
      if (k.d - opt.t * s.c > opt.margin) continue;
      const con = newPeriodicConstraint('strut', s.a, s.b, s.shift, k.ta, k.tb, s.c, pc.nFree, s.continuum !== null);
      if (Number.isFinite(evaluatePeriodic(con, pc, pp, true))) out.push(con);
    }
  }
  const radius = radiusLimit(pp.posed.R, opt, (i) => newPeriodicConstraint('radius', i, i, [], 0, 0, 1, pc.nFree));
  if (radius) out.push(radius);
  return out;
}

/** The tightest radius limit t·w_i <= R_i (the others are implied), when within opt.margin; null otherwise. */
function radiusLimit<C extends Constraint>(
  R: ArrayLike<number>, opt: { t: number; margin: number; w: readonly number[] }, make: (ring: number) => C,
): C | null {
  let best = -1, lim = Infinity;
  for (let i = 0; i < opt.w.length; i++) {
    const v = R[i]! / opt.w[i]!;
    if (v < lim) {
      lim = v;
      best = i;
    }
  }
  if (!(best >= 0 && lim - opt.t <= opt.margin)) return null;
  const con = make(best);
  con.g = lim;
  return con;
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
export function activeSet<C extends Constraint>(cons: readonly C[], t: number, tol: number): C[] {
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
