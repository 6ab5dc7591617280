// Hand-built result files for the report tests, so they do not depend on the solver.
// The Hopf result is the known optimum (Cantarella–Kusner–Sullivan 2002: tight Hopf link of round
// rings, each through the other's centre, tube R/2). The torus:3 compare result is illustrative:
// two hand-chosen pairwise-linked layouts whose tube radius and contacts are measured here by brute
// force sampling, not optimised; the starts, histories and sweep are made-up but well-formed.
import type { CompareResult, ResultContact, ResultRing, SolveResult, StartRecord, SweepPoint } from '../src/model/result.js';
import type { Symmetry, Vec3 } from '../src/model/types.js';
import { normalize, planeBasis, rotate } from '../src/model/vec.js';

/** Tight Hopf link with R = 1 (tube 1/2): A in the xy-plane at the origin, B in the xz-plane through it. */
export function hopfResult(): SolveResult {
  const rings = [ring('A', [0, 0, 0], [0, 0, 1], 1, 0.5), ring('B', [1, 0, 0], [0, 1, 0], 1, 0.5)];
  // Every point of A is at distance 1 from A's centre, which lies on B: a continuum of closest pairs.
  const contacts: ResultContact[] = [];
  for (let k = 1; k <= 4; k++) {
    const u = (2 * Math.PI * k) / 5;
    contacts.push({ a: 0, b: 1, onA: [Math.cos(u), Math.sin(u), 0], onB: [0, 0, 0], distance: 1, force: 0.125, continuum: true });
    contacts.push({ a: 0, b: 1, onA: [1, 0, 0], onB: [1 + Math.cos(u), 0, Math.sin(u)], distance: 1, force: 0.125, continuum: true });
  }
  return solveResult('inflate', 'hopf', rings, contacts, null, 'mm', starts(7, 0.5, 0.5 / 3 * 2, 3));
}

/** Illustrative torus:3 compare result; one ring is named with markup to exercise escaping. */
export function torus3Compare(): CompareResult {
  const sym: Symmetry = { type: 'cyclic', order: 3, axis: [0, 0, 1], origin: [0, 0, 0] };
  const symmetricPoses = cyclicPoses(0.5, 0.6);
  const brokenPoses = cyclicPoses(0.5, 0.7).map((p, i) => i === 0
    ? { c: [p.c[0] + 0.015, p.c[1] - 0.01, p.c[2] + 0.02] as Vec3, n: normalize(rotate(p.n, [0, 0, 1], 0.03)) }
    : p);
  const names = ['A', 'B', '<img src=x onerror="window.__pwned=1">'];
  const symmetric = measured('compare', symmetricPoses, names, sym, 11);
  const broken = measured('compare', brokenPoses, names, null, 23);
  const gain = broken.tube - symmetric.tube;
  const sweep: SweepPoint[] = [0, 0.005, 0.01, 0.02, 0.04, 0.06].map((epsilon, k, all) => ({
    epsilon,
    tube: symmetric.tube + gain * Math.sin((Math.PI / 2) * Math.min(1, (1.6 * k) / (all.length - 1))),
    status: k === 2 ? 'stalled' : 'optimal',
  }));
  return {
    ...broken,
    command: 'compare',
    symmetric,
    broken,
    gain,
    gainPercent: (100 * gain) / symmetric.tube,
    changes: names.map((name, i) => ({ name, displacement: i === 0 ? 0.027 : 0.004, tiltDegrees: i === 0 ? 5.9 : 0.7 })),
    sweep,
  };
}

function cyclicPoses(rho: number, alpha: number): { c: Vec3; n: Vec3 }[] {
  return [0, 1, 2].map((k) => {
    const th = (2 * Math.PI * k) / 3;
    const radial: Vec3 = [Math.cos(th), Math.sin(th), 0];
    return { c: [rho * radial[0], rho * radial[1], 0], n: rotate([0, 0, 1], radial, alpha) };
  });
}

// Tube radius = half the smallest core-to-core distance, found by sampling both circles.
function measured(command: string, poses: { c: Vec3; n: Vec3 }[], names: string[], sym: Symmetry | null, seed: number): SolveResult {
  const pairs: { a: number; b: number; d: number; p: Vec3; q: Vec3 }[] = [];
  for (let a = 0; a < poses.length; a++) {
    for (let b = a + 1; b < poses.length; b++) pairs.push({ a, b, ...closest(poses[a]!, poses[b]!) });
  }
  const tube = Math.min(...pairs.map((p) => p.d)) / 2;
  const rings = poses.map((p, i) => ring(names[i]!, p.c, p.n, 1, tube));
  const active = pairs.filter((p) => p.d < 2 * tube * 1.02);
  const contacts: ResultContact[] = pairs.map((p) => ({
    a: p.a, b: p.b, onA: p.p, onB: p.q, distance: p.d,
    force: active.includes(p) ? (p.d === 2 * tube ? 2 : 1) / (active.length + 1) : 0,
  }));
  return solveResult(command, 'torus:3', rings, contacts, sym, null, starts(seed, tube, 1 / 3, 6));
}

function closest(A: { c: Vec3; n: Vec3 }, B: { c: Vec3; n: Vec3 }): { d: number; p: Vec3; q: Vec3 } {
  const pa = samples(A, 720), pb = samples(B, 720);
  let d = Infinity, p: Vec3 = [0, 0, 0], q: Vec3 = [0, 0, 0];
  for (const x of pa) for (const y of pb) {
    const e = Math.hypot(x[0] - y[0], x[1] - y[1], x[2] - y[2]);
    if (e < d) { d = e; p = x; q = y; }
  }
  return { d, p, q };
}

function samples(r: { c: Vec3; n: Vec3 }, m: number): Vec3[] {
  const [e1, e2] = planeBasis(normalize(r.n));
  return Array.from({ length: m }, (_, i) => {
    const u = (2 * Math.PI * i) / m, cu = Math.cos(u), su = Math.sin(u);
    return [r.c[0] + cu * e1[0] + su * e2[0], r.c[1] + cu * e1[1] + su * e2[1], r.c[2] + cu * e1[2] + su * e2[2]] as Vec3;
  });
}

function ring(name: string, center: Vec3, normal: Vec3, radius: number, tube: number): ResultRing {
  return { name, center, normal: normalize(normal), radius, tube, aspectRatio: (radius - tube) / tube };
}

// Made-up but plausible multistart records: most converge to the best tube, one stalls, one fails.
function starts(seed: number, best: number, from: number, count: number): StartRecord[] {
  return Array.from({ length: count }, (_, k) => {
    const status = k === count - 1 && count > 3 ? 'failed' : k === 2 ? 'stalled' : 'optimal';
    const final = status === 'optimal' ? best * (1 - 1e-6 * k) : status === 'stalled' ? best * 0.93 : 0;
    const n = 8 + ((seed + 3 * k) % 7);
    const history = status === 'failed' ? [from * 0.8, from * 0.85]
      : Array.from({ length: n }, (_, i) => final - (final - from * (0.6 + 0.05 * k)) * Math.exp(-0.55 * i));
    return { seed: seed + k, status, tube: final, iterations: history.length, history, retries: status === 'failed' ? 2 : 0 };
  });
}

function solveResult(
  command: string, spec: string, rings: ResultRing[], contacts: ResultContact[], symmetry: Symmetry | null,
  units: string | null, startRecords: StartRecord[],
): SolveResult {
  const tube = Math.min(...rings.map((r) => r.tube));
  const R = Math.min(...rings.map((r) => r.radius));
  // k = 2 rings through one ring: r <= R/3 (circle packing in a circle, Kravitz 1967); Hopf: k = 1, r <= R/2.
  const boundTube = rings.length === 2 ? R / 2 : R / 3;
  return {
    format: 'thickring-result/1', command, spec, units, status: 'optimal', tube, tubeOverCore: tube / R,
    aspectRatio: Math.min(...rings.map((r) => r.aspectRatio)), tubeRatios: rings.map(() => 1), rings,
    linking: rings.map((_, i) => rings.map((__, j) => (i === j ? 0 : 1))), symmetry,
    contacts,
    certificate: {
      method: 'kkt-nnls', balanceResidual: 3.2e-9, maxViolation: 1.1e-10, activeStruts: contacts.filter((c) => c.force > 0).length,
      certified: true, note: 'hand-built fixture: certificate figures are illustrative',
    },
    bound: { tube: boundTube, ring: 0, through: rings.length - 1, gap: (boundTube - tube) / boundTube },
    starts: startRecords,
    verification: { ok: true, minClearance: 2e-9, linkingPreserved: true, tubeWithinRadius: true, messages: ['fixture: sampled by hand'] },
    elapsedSeconds: 1.25,
  };
}
