// Start arrangements for solver checks and benches (not the catalogue): deliberately loose, non-optimal
// poses with the intended linking.
import type { Ring, Vec3 } from '../../model/types.js';

/**
 * Two linked rings, radii R1 (A, in the xy plane at the origin) and R2 (B, tilted, its centre off the
 * rim of A). At the tight position B would lie in the xz plane centred on A's rim.
 */
export function hopfStart(R1 = 1, R2 = R1): Ring[] {
  return [
    { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: R1 },
    { name: 'B', center: [R1 * 0.8, 0.05 * R1, 0.1 * R2], normal: unit([0.15, 1, 0.1]), radius: R2 },
  ];
}

/** A chain of three equal rings A–B–C: B flat at the origin, A and C upright through it, A and C unlinked. */
export function chain3Start(R = 1): Ring[] {
  return [
    { name: 'A', center: [-1.25 * R, 0.02 * R, 0], normal: unit([0.05, 1, 0.1]), radius: R },
    { name: 'B', center: [0, 0, 0], normal: [0, 0, 1], radius: R },
    { name: 'C', center: [1.25 * R, -0.03 * R, 0.01 * R], normal: unit([-0.1, 1, -0.05]), radius: R },
  ];
}

/**
 * N pairwise-linked equal rings: stereographic images of the Hopf fibres through (cos η, e^{iψ} sin η)
 * with ψ = -2πk/N, which are round circles carried into one another by rotation about z by 2π/N.
 */
export function torusLinkStart(N = 3, R = 1, eta = Math.PI / 4): Ring[] {
  const rings: Ring[] = [];
  for (let k = 0; k < N; k++) {
    const psi = (-2 * Math.PI * k) / N;
    const p = [0, 1, 2].map((i) => fibrePoint(eta, psi, (2 * Math.PI * i) / 3));
    const { center, normal, radius } = circleThrough(p[0]!, p[1]!, p[2]!);
    rings.push({ name: String.fromCharCode(65 + k), center, normal, radius });
  }
  const s = R / rings[0]!.radius;
  return rings.map((r) => ({ ...r, center: [r.center[0] * s, r.center[1] * s, r.center[2] * s], radius: r.radius * s }));
}

// --- helpers ---

/** Stereographic projection from (0,0,0,1) of e^{it}(cos η, e^{iψ} sin η) in S³ ⊂ C². */
function fibrePoint(eta: number, psi: number, t: number): Vec3 {
  const x1 = Math.cos(eta) * Math.cos(t), x2 = Math.cos(eta) * Math.sin(t);
  const x3 = Math.sin(eta) * Math.cos(t + psi), x4 = Math.sin(eta) * Math.sin(t + psi);
  const d = 1 - x4;
  return [x1 / d, x2 / d, x3 / d];
}

function circleThrough(a: Vec3, b: Vec3, c: Vec3): { center: Vec3; normal: Vec3; radius: number } {
  const ab = sub(b, a), ac = sub(c, a);
  const n = cross(ab, ac);
  const n2 = dot(n, n);
  // Circumcentre: a + ((|ac|² (n × ab)) + (|ab|² (ac × n))) / (2 |n|²)
  const t1 = cross(n, ab), t2 = cross(ac, n);
  const ab2 = dot(ab, ab), ac2 = dot(ac, ac);
  const center: Vec3 = [0, 1, 2].map((i) => a[i]! + (ac2 * t1[i]! + ab2 * t2[i]!) / (2 * n2)) as Vec3;
  return { center, normal: unit(n), radius: Math.hypot(...sub(a, center)) };
}

function unit(v: Vec3): Vec3 {
  const l = Math.hypot(v[0], v[1], v[2]);
  return [v[0] / l, v[1] / l, v[2] / l];
}
function sub(a: Vec3, b: Vec3): Vec3 {
  return [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
}
function dot(a: Vec3, b: Vec3): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}
function cross(a: Vec3, b: Vec3): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}
