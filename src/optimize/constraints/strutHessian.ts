// Curvature of a strut: the Hessian of a contact distance d = |A(s*) − B(t*)| (a local minimum over the two
// material angles) with respect to the rigid motions of its two rings.
//
// Coordinates x (12): ring a's translation v_a and rotation ω_a about its centre (exponential coordinates,
// ring points move as c + v + exp([ω]×) r), then the same for ring b. Derivation (by hand; checked against
// second differences of the exact kernel in tests/strutHessian.test.ts):
//   w(x, θ) = A − B, θ = (s, t), F = ½|w|².  The minimum value F*(x) = F(x, θ*(x)) has, by the envelope
//   theorem and the implicit function theorem on F_θ = 0,
//       ∇²F* = F_xx − F_xθ F_θθ⁻¹ F_θx,
//   with F_xx = J_xᵀJ_x + Σ w_k ∇²_xx w_k,  F_xθ = J_xᵀJ_θ + Σ w_k ∇²_xθ w_k,  F_θθ = J_θᵀJ_θ + Σ w_k ∇²_θθ w_k.
//   With r_a = A − c_a, T_a = dA/ds (|T_a| = R_a, d²A/ds² = −r_a), and exp([ω]×) r = r + ω×r + ½ ω×(ω×r) + …:
//       J_x = [ I, −[r_a]×, −I, [r_b]× ],            J_θ = [ T_a, −T_b ],
//       w·∂²w/∂ω_a² = ½(r_a wᵀ + w r_aᵀ) − (w·r_a) I,  and minus the same with r_b for ring b,
//       w·∂²w/∂ω_a∂s = T_a × w,  w·∂²w/∂ω_b∂t = −T_b × w,
//       w·∂²w/∂s² = −w·r_a,  w·∂²w/∂t² = w·r_b,  no second derivatives in the translations.
//   Then d = √(2F*): ∇²d = ∇²F*/d − ∇F* ∇F*ᵀ/d³, with ∇F* = J_xᵀ w.
// The result is the exact Hessian at the strut (the chart's exponential coordinates are linear in the chart
// variables at z = 0, so a chart pulls it back by its Jacobian alone).
import type { Vec3 } from '../../model/types.js';

/** The angle Hessian counts as singular below this (relative to its size): a continuum of closest pairs. */
const SINGULAR_REL = 1e-14;

// Scratch (no allocation per strut).
const JX = new Float64Array(36); // 3 × 12, row-major
const FXX = new Float64Array(144);
const FXT = new Float64Array(24); // 12 × 2
const GF = new Float64Array(12);

/**
 * Hessian (12 × 12, row-major into `out`) of the strut length between the point pa on ring a (centre ca,
 * unit normal na) and pb on ring b, w.r.t. (v_a, ω_a, v_b, ω_b). pa, pb must be a local closest pair
 * (d > 0). With `fixedB` the point on b is a material point carried by ring b (a sampled near-contact) and
 * only the angle on a is minimised: θ = (s) alone. Returns the length, or NaN when the angle Hessian is
 * singular (a continuum of closest pairs).
 */
export function strutHessian(
  pa: ArrayLike<number>, ca: ArrayLike<number>, na: ArrayLike<number>,
  pb: ArrayLike<number>, cb: ArrayLike<number>, nb: ArrayLike<number>,
  out: Float64Array, fixedB = false,
): number {
  const w: Vec3 = [pa[0]! - pb[0]!, pa[1]! - pb[1]!, pa[2]! - pb[2]!];
  const ra: Vec3 = [pa[0]! - ca[0]!, pa[1]! - ca[1]!, pa[2]! - ca[2]!];
  const rb: Vec3 = [pb[0]! - cb[0]!, pb[1]! - cb[1]!, pb[2]! - cb[2]!];
  // Tangents dA/ds = n × r (length R): the sign convention cancels in the Schur complement.
  const Ta = cross(na, ra), Tb = cross(nb, rb);
  // J_x: column j of ω_a is e_j × r_a, of ω_b is −e_j × r_b.
  JX.fill(0);
  for (let i = 0; i < 3; i++) {
    JX[i * 12 + i] = 1;
    JX[i * 12 + 6 + i] = -1;
  }
  for (let j = 0; j < 3; j++) {
    const ca3 = crossE(j, ra), cb3 = crossE(j, rb);
    for (let i = 0; i < 3; i++) {
      JX[i * 12 + 3 + j] = ca3[i]!;
      JX[i * 12 + 9 + j] = -cb3[i]!;
    }
  }
  // F_xx = J_xᵀ J_x + rotation blocks.
  for (let p = 0; p < 12; p++) {
    for (let q = 0; q < 12; q++) {
      FXX[p * 12 + q] = JX[p]! * JX[q]! + JX[12 + p]! * JX[12 + q]! + JX[24 + p]! * JX[24 + q]!;
    }
  }
  const wra = dot(w, ra), wrb = dot(w, rb);
  for (let i = 0; i < 3; i++) {
    for (let j = 0; j < 3; j++) {
      const ha = 0.5 * (ra[i]! * w[j]! + w[i]! * ra[j]!) - (i === j ? wra : 0);
      const hb = 0.5 * (rb[i]! * w[j]! + w[i]! * rb[j]!) - (i === j ? wrb : 0);
      FXX[(3 + i) * 12 + 3 + j] = FXX[(3 + i) * 12 + 3 + j]! + ha;
      FXX[(9 + i) * 12 + 9 + j] = FXX[(9 + i) * 12 + 9 + j]! - hb;
    }
  }
  // F_xθ = J_xᵀ J_θ + mixed terms.
  const Taw = cross(Ta, w), Tbw = cross(Tb, w);
  for (let p = 0; p < 12; p++) {
    FXT[2 * p] = JX[p]! * Ta[0] + JX[12 + p]! * Ta[1] + JX[24 + p]! * Ta[2];
    FXT[2 * p + 1] = -(JX[p]! * Tb[0] + JX[12 + p]! * Tb[1] + JX[24 + p]! * Tb[2]);
  }
  for (let i = 0; i < 3; i++) {
    FXT[2 * (3 + i)] = FXT[2 * (3 + i)]! + Taw[i]!;
    FXT[2 * (9 + i) + 1] = FXT[2 * (9 + i) + 1]! - Tbw[i]!;
  }
  // F_θθ and its inverse (2 × 2).
  const a11 = dot(Ta, Ta) - wra, a22 = dot(Tb, Tb) + wrb, a12 = -dot(Ta, Tb);
  const det = fixedB ? a11 : a11 * a22 - a12 * a12;
  const d = Math.hypot(w[0], w[1], w[2]);
  if (!(Math.abs(det) > SINGULAR_REL * (fixedB ? Math.abs(a11) : a11 * a11 + a22 * a22)) || !(d > 0)) {
    out.fill(NaN);
    return NaN;
  }
  const i11 = fixedB ? 1 / a11 : a22 / det, i22 = fixedB ? 0 : a11 / det, i12 = fixedB ? 0 : -a12 / det;
  for (let p = 0; p < 12; p++) GF[p] = JX[p]! * w[0] + JX[12 + p]! * w[1] + JX[24 + p]! * w[2];
  const d3 = d * d * d;
  for (let p = 0; p < 12; p++) {
    const xp = FXT[2 * p]!, yp = FXT[2 * p + 1]!;
    for (let q = 0; q < 12; q++) {
      const xq = FXT[2 * q]!, yq = FXT[2 * q + 1]!;
      const schur = FXX[p * 12 + q]! - (xp * (i11 * xq + i12 * yq) + yp * (i12 * xq + i22 * yq));
      out[p * 12 + q] = schur / d - (GF[p]! * GF[q]!) / d3;
    }
  }
  return d;
}

function cross(a: ArrayLike<number>, b: ArrayLike<number>): Vec3 {
  return [a[1]! * b[2]! - a[2]! * b[1]!, a[2]! * b[0]! - a[0]! * b[2]!, a[0]! * b[1]! - a[1]! * b[0]!];
}
/** e_j × r. */
function crossE(j: number, r: Vec3): Vec3 {
  if (j === 0) return [0, -r[2], r[1]];
  if (j === 1) return [r[2], 0, -r[0]];
  return [-r[1], r[0], 0];
}
function dot(a: ArrayLike<number>, b: ArrayLike<number>): number {
  return a[0]! * b[0]! + a[1]! * b[1]! + a[2]! * b[2]!;
}
