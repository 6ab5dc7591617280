// Work on the exact f and h where the stationary polynomial g cannot be trusted: the sampled near-continuum
// regime, flat high-order minima (A running along B's axis), root brackets on h, and the last-resort global
// minimum. Reads the current query from queryGeometry.ts.
import { wrapAngle } from './frame.js';
import {
  CONTINUUM_REL_TOL, F_NOISE_REL, GEO, Geo, H_NOISE, HSCALE, MAX_CONTACTS, CONTACT_STRIDE, ROOT_ANGLE_TOL, TWO_PI,
  fAt, hAt, rho2At, writeContact,
} from './queryGeometry.js';

/** Uniform samples of the near-continuum regime (plus a geometric grid at the axis approach). */
const NEAR_CONTINUUM_SAMPLES = 720;
const SAMPLE_S = new Float64Array(NEAR_CONTINUUM_SAMPLES + 160);
/** Half-width (radians) of the window searched on f when h sinks into its rounding level. */
export const FLAT_WINDOW = 1e-3;
/** Offset (radians) at which h is read around a golden-section minimum. */
const POLISH_STEP = 1e-7;

/**
 * Near-continuum regime (f varies by a tiny fraction of the distance, e.g. within 1e-7 of the tight Hopf
 * arrangement): sign changes of the exact h on a grid, each bracketed root refined on h. Where A passes close
 * to B's axis, f has a cusp-like maximum of width ~ rho_min with minima beside it, so the grid is refined
 * geometrically around the closest approach (steps rho_min/RA * 2^k). A minimum can only be missed if it lies
 * within one grid step of a maximum away from the axis, where f is nearly constant.
 */
export function sampleMinima(out: Float64Array): number {
  const nS = buildSamples(NEAR_CONTINUUM_SAMPLES);
  // Where f is constant on an arc (A on the tube around B between two crossings of B's axis, the rest of A
  // nearer) h is pure rounding and changes sign at random, and such an arc is always f's highest level (on the
  // rest of A, f = c^2 - 4 RB rho lies below the arc's c^2). So a root whose f is within rounding of the largest
  // sampled f is no minimum. (A genuine minimum that close to the maximum would make f constant to rounding,
  // which the continuum test reports first.)
  let fMax = 0;
  for (let i = 0; i < nS; i++) fMax = Math.max(fMax, fAt(SAMPLE_S[i]!));
  const fTop = fMax - F_NOISE_REL * Math.cbrt(HSCALE[0]!) ** 2;
  let count = 0;
  const h0 = hAt(SAMPLE_S[0]!);
  let hPrev = h0;
  for (let i = 1; i <= nS && count < MAX_CONTACTS; i++) {
    const sPrev = SAMPLE_S[i - 1]!;
    const sv = i === nS ? SAMPLE_S[0]! + TWO_PI : SAMPLE_S[i]!;
    const h = i === nS ? h0 : hAt(sv);
    if (hPrev < 0 && h >= 0) {
      const root = refineH(sPrev, sv, hPrev, h);
      if (fAt(root) < fTop) writeContact(out, count++, wrapAngle(root));
    }
    hPrev = h;
  }
  return count;
}

/**
 * Sorted sample angles in SAMPLE_S: n uniform ones plus a geometric grid (steps rho_min/RA * 2^k) around A's
 * closest approach to B's axis, where f has a cusp-like feature of width ~ rho_min. Returns the count.
 */
function buildSamples(n: number): number {
  const rA = GEO[Geo.rA]!;
  const step = TWO_PI / n;
  let nS = 0;
  let bestRho = Infinity, bestI = 0;
  for (let i = 0; i < n; i++) {
    const sv = i * step;
    SAMPLE_S[nS++] = sv;
    const r2 = rho2At(sv);
    if (r2 < bestRho) { bestRho = r2; bestI = i; }
  }
  let lo = (bestI - 1) * step, hi = (bestI + 1) * step;
  for (let it = 0; it < 80; it++) {
    const x1 = hi - 0.6180339887498949 * (hi - lo), x2 = lo + 0.6180339887498949 * (hi - lo);
    if (rho2At(x1) < rho2At(x2)) hi = x2;
    else lo = x1;
  }
  const sc = 0.5 * (lo + hi);
  const width = Math.max(Math.sqrt(Math.max(rho2At(sc), 0)) / rA, 1e-15);
  for (let k = -6; k < 60 && width * 2 ** k < step; k++) {
    SAMPLE_S[nS++] = sc - width * 2 ** k;
    SAMPLE_S[nS++] = sc + width * 2 ** k;
  }
  SAMPLE_S[nS++] = sc;
  for (let i = 0; i < nS; i++) SAMPLE_S[i] = wrapAngle(SAMPLE_S[i]!);
  SAMPLE_S.subarray(0, nS).sort();
  return nS;
}

/** f is constant along A (a circle on a tube around B): compare f at spread samples and around the axis cusp. */
export function isConstantF(L: number): boolean {
  const nS = buildSamples(32);
  let lo = Infinity, hi = -Infinity;
  for (let k = 0; k < nS; k++) {
    const d = Math.sqrt(fAt(SAMPLE_S[k]!));
    if (d < lo) lo = d;
    if (d > hi) hi = d;
  }
  return hi - lo <= CONTINUUM_REL_TOL * L;
}
/**
 * Every periodic f has a minimum, so zero minima means rounding hid the sign pattern (g nearly flat). Take the
 * lowest of a fine sample, polished by golden-section search, so the global distance is still reported.
 */
export function globalFallback(out: Float64Array): number {
  const n = 720;
  let best = 0, bestF = Infinity;
  for (let i = 0; i < n; i++) {
    const f = fAt((i * TWO_PI) / n);
    if (f < bestF) { bestF = f; best = i; }
  }
  let lo = ((best - 1) * TWO_PI) / n, hi = ((best + 1) * TWO_PI) / n;
  const gr = 0.6180339887498949;
  for (let it = 0; it < 60; it++) {
    const x1 = hi - gr * (hi - lo), x2 = lo + gr * (hi - lo);
    if (fAt(x1) < fAt(x2)) hi = x2;
    else lo = x1;
  }
  writeContact(out, 0, wrapAngle(0.5 * (lo + hi)));
  return 1;
}

/**
 * A local minimum of f within [m - 2r, m + 2r] found by golden section on f, or NaN when the smallest of
 * f(m - r), f(m), f(m + r) is not interior (f is monotone here) or the minimum is already listed.
 */
export function flatMinimum(m: number, r: number, out: Float64Array, count: number): number {
  const fl = fAt(m - r), fm = fAt(m), fh = fAt(m + r);
  // A flat maximum (near-coaxial rings: f varies by rounding over the window) can pass fm <= fl, fh by chance:
  // ask for a rise above f's rounding level on at least one side.
  if (!(fm <= fl && fm <= fh) || Math.max(fl, fh) - fm <= F_NOISE_REL * Math.cbrt(HSCALE[0]!) ** 2) return NaN;
  const x = goldenOnF(m - r, m + r);
  return alreadyListed(out, count, x, 4 * r) ? NaN : x;
}

/** Whether a contact within `width` radians of angle x is already in out[0 .. count). */
export function alreadyListed(out: Float64Array, count: number, x: number, width: number): boolean {
  for (let k = 0; k < count; k++) {
    const d = Math.abs(wrapAngle(out[k * CONTACT_STRIDE]!) - wrapAngle(x));
    if (Math.min(d, TWO_PI - d) < width) return true;
  }
  return false;
}

/**
 * Minimum of f on [lo, hi] by golden-section search (f unimodal there), then bracketed on h when h has a
 * readable sign change close by (golden section alone locates a simple minimum only to ~sqrt(eps)).
 */
export function goldenOnF(lo: number, hi: number): number {
  const x = goldenSection(lo, hi);
  const hl = hAt(x - POLISH_STEP), hh = hAt(x + POLISH_STEP);
  const hn = H_NOISE * HSCALE[0]!;
  return hl < -hn && hh > hn ? refineH(x - POLISH_STEP, x + POLISH_STEP, hl, hh) : x;
}

/**
 * goldenOnF, but NaN when the smallest f of the window lies at one of its ends (f monotone there: A passing by
 * B's axis makes h vanish into rounding at a kink of f that is a maximum, and the window then only slopes).
 */
export function windowMinimum(lo: number, hi: number): number {
  const x = goldenOnF(lo, hi);
  const edge = 0.01 * (hi - lo);
  return x - lo > edge && hi - x > edge ? x : NaN;
}

function goldenSection(lo: number, hi: number): number {
  let x1 = hi - 0.6180339887498949 * (hi - lo), x2 = lo + 0.6180339887498949 * (hi - lo);
  let f1 = fAt(x1), f2 = fAt(x2);
  for (let it = 0; it < 80 && hi - lo > ROOT_ANGLE_TOL; it++) {
    if (f1 < f2) {
      hi = x2; x2 = x1; f2 = f1;
      x1 = hi - 0.6180339887498949 * (hi - lo); f1 = fAt(x1);
    } else {
      lo = x1; x1 = x2; f1 = f2;
      x2 = lo + 0.6180339887498949 * (hi - lo); f2 = fAt(x2);
    }
  }
  return 0.5 * (lo + hi);
}

/** Root of h (read directly, not through g) in [lo, hi] given h(lo) < 0 <= h(hi): Illinois-modified regula falsi. */
export function refineH(lo: number, hi: number, hLo: number, hHi: number): number {
  let a = lo, b = hi, fa = hLo, fb = hHi;
  if (fb === 0) return b;
  let side = 0;
  for (let it = 0; it < 200 && b - a > ROOT_ANGLE_TOL; it++) {
    let x = (a * fb - b * fa) / (fb - fa);
    if (!(x > a && x < b)) x = 0.5 * (a + b);
    const fx = hAt(x);
    if (fx === 0) return x;
    if (fx < 0) {
      a = x; fa = fx;
      if (side === -1) fb *= 0.5;
      side = -1;
    } else {
      b = x; fb = fx;
      if (side === 1) fa *= 0.5;
      side = 1;
    }
  }
  return 0.5 * (a + b);
}
