// Independent checks of meshes before they are written: topology (closed, consistently oriented,
// Euler characteristic), outward orientation (signed volume), volume and area against the torus
// formulas of Pappus (V = 2 pi^2 R r^2, A = 4 pi^2 R r), and the gap between bodies.
import type { MeshBody, Torus } from './torusMesh.js';

export interface BodyCheck {
  name: string;
  vertices: number;
  triangles: number;
  /** Every directed edge appears exactly once and its reverse exactly once. */
  closedOriented: boolean;
  /** Directed edges seen more than once or without their reverse. */
  badEdges: number;
  degenerateTriangles: number;
  /** V - E + F; 0 for a torus. */
  euler: number;
  /** Signed volume (divergence theorem); positive when normals point outward. */
  volume: number;
  area: number;
  /** Pappus values of the torus the body approximates, when given. */
  expectedVolume: number | null;
  expectedArea: number | null;
  volumeError: number | null;
  areaError: number | null;
}

export interface GapCheck {
  a: number;
  b: number;
  /** Least vertex-to-triangle distance between the bodies (negative when a vertex is inside the other body). */
  distance: number;
}

export interface MeshReport {
  ok: boolean;
  bodies: BodyCheck[];
  /** Pairs whose bounding boxes come within `clearance + slack` of each other. */
  gaps: GapCheck[];
  minGap: number | null;
  messages: string[];
}

export interface MeshCheckOptions {
  /** Tori the bodies approximate, in the same order (enables the Pappus checks). */
  tori?: readonly Torus[];
  /** Required gap between bodies (mm). */
  clearance: number;
  /** Chord tolerance the meshes were built with (mm). */
  chord: number;
}

/**
 * Relative volume/area error allowed per unit of chord/r. Inscribed polygons lose
 * about (2/3)(pi/n)^2 = (4/3) sagitta / rho of their circle's area in each direction; 4 leaves margin.
 */
const PAPPUS_ERROR_PER_CHORD = 4;
/** Winding number above this counts as inside (exactly 1 inside, 0 outside a closed mesh). */
const INSIDE_WINDING = 0.5;

export function checkMeshes(bodies: readonly MeshBody[], options: MeshCheckOptions): MeshReport {
  const messages: string[] = [];
  const checks = bodies.map((b, i) => checkBody(b, options.tori?.[i] ?? null));
  checks.forEach((c, i) => {
    if (!c.closedOriented) messages.push(`body ${c.name}: ${c.badEdges} directed edges unmatched (not closed or not consistently oriented)`);
    if (c.euler !== 0) messages.push(`body ${c.name}: Euler characteristic ${c.euler}, expected 0 for a torus`);
    if (!(c.volume > 0)) messages.push(`body ${c.name}: signed volume ${c.volume} is not positive (normals point inward)`);
    if (c.degenerateTriangles > 0) messages.push(`body ${c.name}: ${c.degenerateTriangles} degenerate triangles`);
    const torus = options.tori?.[i];
    if (torus && c.volumeError !== null && c.areaError !== null) {
      const tol = pappusTolerance(torus, options.chord);
      if (Math.abs(c.volumeError) > tol || Math.abs(c.areaError) > tol) {
        messages.push(
          `body ${c.name}: relative volume error ${c.volumeError.toExponential(2)} or area error ${c.areaError.toExponential(2)} exceeds ${tol.toExponential(2)}`,
        );
      }
    }
  });
  const gaps: GapCheck[] = [];
  const slack = options.clearance + 2 * options.chord;
  const boxes = bodies.map((b) => bbox(b.positions));
  for (let a = 0; a < bodies.length; a++) {
    for (let b = a + 1; b < bodies.length; b++) {
      if (boxGap(boxes[a]!, boxes[b]!) > slack) continue;
      const ta = options.tori?.[a] ?? null, tb = options.tori?.[b] ?? null;
      const d = Math.min(vertexToBody(bodies[a]!, bodies[b]!, boxes[b]!, slack, tb), vertexToBody(bodies[b]!, bodies[a]!, boxes[a]!, slack, ta));
      // No vertex came within the slack of the other's box: the pair is farther apart than any gap checked.
      if (d !== Infinity) gaps.push({ a, b, distance: d });
    }
  }
  const minGap = gaps.length ? Math.min(...gaps.map((g) => g.distance)) : null;
  // Facets stand off the exact surface by at most about one chord, so allow that much.
  const need = options.clearance - options.chord;
  for (const g of gaps) {
    if (g.distance < need) {
      messages.push(
        `bodies ${bodies[g.a]!.name} and ${bodies[g.b]!.name}: mesh gap ${g.distance.toPrecision(4)} mm is below clearance minus chord ${need.toPrecision(4)} mm`,
      );
    }
  }
  return { ok: messages.length === 0, bodies: checks, gaps, minGap, messages };
}

/** Relative Pappus tolerance for a torus meshed at this chord. */
export function pappusTolerance(t: Torus, chord: number): number {
  return PAPPUS_ERROR_PER_CHORD * (chord / t.tube + chord / t.radius);
}

function checkBody(body: MeshBody, torus: Torus | null): BodyCheck {
  const p = body.positions, tri = body.triangles;
  const nv = p.length / 3, nt = tri.length / 3;
  const directed = new Map<number, number>();
  let volume = 0, area = 0, degenerate = 0;
  const scale = maxExtent(p);
  // A triangle whose doubled area is below this (relative to the body's size squared) is degenerate.
  const tinyArea = 1e-14 * scale * scale;
  for (let t = 0; t < nt; t++) {
    const i = tri[3 * t]!, j = tri[3 * t + 1]!, k = tri[3 * t + 2]!;
    for (const [u, v] of [[i, j], [j, k], [k, i]] as const) {
      const key = u * nv + v;
      directed.set(key, (directed.get(key) ?? 0) + 1);
    }
    const ax = p[3 * i]!, ay = p[3 * i + 1]!, az = p[3 * i + 2]!;
    const ux = p[3 * j]! - ax, uy = p[3 * j + 1]! - ay, uz = p[3 * j + 2]! - az;
    const vx = p[3 * k]! - ax, vy = p[3 * k + 1]! - ay, vz = p[3 * k + 2]! - az;
    const cx = uy * vz - uz * vy, cy = uz * vx - ux * vz, cz = ux * vy - uy * vx;
    const twice = Math.hypot(cx, cy, cz);
    if (twice <= tinyArea) degenerate++;
    area += twice / 2;
    // Signed tetrahedron volume against the origin: a . (b x c) / 6 = a . (u x v) / 6.
    volume += (ax * cx + ay * cy + az * cz) / 6;
  }
  let bad = 0;
  for (const [key, count] of directed) {
    const u = Math.floor(key / nv), v = key % nv;
    if (count !== 1 || directed.get(v * nv + u) !== 1) bad++;
  }
  const edges = directed.size / 2;
  const euler = nv - edges + nt;
  const expectedVolume = torus ? 2 * Math.PI * Math.PI * torus.radius * torus.tube * torus.tube : null;
  const expectedArea = torus ? 4 * Math.PI * Math.PI * torus.radius * torus.tube : null;
  return {
    name: body.name,
    vertices: nv,
    triangles: nt,
    closedOriented: bad === 0,
    badEdges: bad,
    degenerateTriangles: degenerate,
    euler: Number.isInteger(edges) ? euler : NaN,
    volume,
    area,
    expectedVolume,
    expectedArea,
    volumeError: expectedVolume ? (volume - expectedVolume) / expectedVolume : null,
    areaError: expectedArea ? (area - expectedArea) / expectedArea : null,
  };
}

type Box = [number, number, number, number, number, number];

function bbox(p: Float64Array): Box {
  const b: Box = [Infinity, Infinity, Infinity, -Infinity, -Infinity, -Infinity];
  for (let i = 0; i < p.length; i += 3) {
    for (let d = 0; d < 3; d++) {
      const x = p[i + d]!;
      if (x < b[d]!) b[d] = x;
      if (x > b[d + 3]!) b[d + 3] = x;
    }
  }
  return b;
}

function boxGap(a: Box, b: Box): number {
  let s = 0;
  for (let d = 0; d < 3; d++) {
    const g = Math.max(a[d]! - b[d + 3]!, b[d]! - a[d + 3]!, 0);
    s += g * g;
  }
  return Math.sqrt(s);
}

function maxExtent(p: Float64Array): number {
  const b = bbox(p);
  return Math.max(b[3] - b[0], b[4] - b[1], b[5] - b[2], 1e-300);
}

/**
 * Least distance from the vertices of `from` to the triangles of `to`, signed negative for vertices
 * inside `to`. Only vertices within `slack` of `to`'s box can matter: farther ones are farther than
 * the gap that is being checked. When `to` is known to approximate a torus, the inside test uses the
 * torus (exact up to the facet deviation, which the chord allowance covers) and vertices are pruned
 * by a rigorous lower bound; otherwise the generalised winding number decides inside.
 */
function vertexToBody(from: MeshBody, to: MeshBody, toBox: Box, slack: number, torus: Torus | null): number {
  const p = from.positions, q = to.positions, tri = to.triangles;
  const nt = tri.length / 3;
  // Bounding sphere of each triangle for cheap rejection; the longest edge bounds how far a facet
  // point can be from a vertex, hence from the exact surface the vertices lie on.
  const sph = new Float64Array(nt * 4);
  let maxEdge = 0;
  for (let t = 0; t < nt; t++) {
    const i = 3 * tri[3 * t]!, j = 3 * tri[3 * t + 1]!, k = 3 * tri[3 * t + 2]!;
    const mx = (q[i]! + q[j]! + q[k]!) / 3, my = (q[i + 1]! + q[j + 1]! + q[k + 1]!) / 3, mz = (q[i + 2]! + q[j + 2]! + q[k + 2]!) / 3;
    let r2 = 0;
    for (const v of [i, j, k]) r2 = Math.max(r2, (q[v]! - mx) ** 2 + (q[v + 1]! - my) ** 2 + (q[v + 2]! - mz) ** 2);
    sph[4 * t] = mx; sph[4 * t + 1] = my; sph[4 * t + 2] = mz; sph[4 * t + 3] = Math.sqrt(r2);
    for (const [u, v] of [[i, j], [j, k], [k, i]] as const) {
      maxEdge = Math.max(maxEdge, Math.hypot(q[u]! - q[v]!, q[u + 1]! - q[v + 1]!, q[u + 2]! - q[v + 2]!));
    }
  }
  // Candidate vertices with a lower bound on their distance, nearest first, so `best` shrinks early.
  const cand: number[] = [], lower: number[] = [];
  const frame = torus ? torusFrame(torus) : null;
  for (let v = 0; v < p.length; v += 3) {
    const x = p[v]!, y = p[v + 1]!, z = p[v + 2]!;
    const outside = Math.max(toBox[0] - x, x - toBox[3], toBox[1] - y, y - toBox[4], toBox[2] - z, z - toBox[5]);
    if (outside > slack) continue;
    cand.push(v);
    lower.push(frame ? torusCoreDistance(frame, x, y, z) - frame.tube - maxEdge : -Infinity);
  }
  const order = cand.map((_, k) => k).sort((m, n) => lower[m]! - lower[n]!);
  let best = Infinity;
  const cp = new Float64Array(3);
  for (const k of order) {
    if (lower[k]! > best) break;
    const v = cand[k]!;
    const x = p[v]!, y = p[v + 1]!, z = p[v + 2]!;
    const inside = frame
      ? torusCoreDistance(frame, x, y, z) < frame.tube
      : Math.max(toBox[0] - x, x - toBox[3], toBox[1] - y, y - toBox[4], toBox[2] - z, z - toBox[5]) <= 0 &&
        windingNumber(x, y, z, q, tri) > INSIDE_WINDING;
    // Inside vertices need their true depth; outside ones only matter if closer than the best so far.
    let d = inside ? Infinity : best;
    for (let t = 0; t < nt; t++) {
      const dx = x - sph[4 * t]!, dy = y - sph[4 * t + 1]!, dz = z - sph[4 * t + 2]!;
      const reach = d + sph[4 * t + 3]!;
      if (d !== Infinity && dx * dx + dy * dy + dz * dz > reach * reach) continue;
      const i = 3 * tri[3 * t]!, j = 3 * tri[3 * t + 1]!, kk = 3 * tri[3 * t + 2]!;
      const dt = pointTriangleDistance(x, y, z, q, i, j, kk, cp);
      if (dt < d) d = dt;
    }
    const signed = inside ? -d : d;
    if (signed < best) best = signed;
  }
  return best;
}

interface TorusFrame {
  cx: number; cy: number; cz: number;
  nx: number; ny: number; nz: number;
  radius: number;
  tube: number;
}

function torusFrame(t: Torus): TorusFrame {
  const l = Math.hypot(t.normal[0]!, t.normal[1]!, t.normal[2]!);
  return { cx: t.center[0]!, cy: t.center[1]!, cz: t.center[2]!, nx: t.normal[0]! / l, ny: t.normal[1]! / l, nz: t.normal[2]! / l, radius: t.radius, tube: t.tube };
}

/** Distance from a point to the core circle (Eberly: d^2 = h^2 + (rho - R)^2). */
function torusCoreDistance(f: TorusFrame, x: number, y: number, z: number): number {
  const dx = x - f.cx, dy = y - f.cy, dz = z - f.cz;
  const h = dx * f.nx + dy * f.ny + dz * f.nz;
  const rho = Math.hypot(dx - h * f.nx, dy - h * f.ny, dz - h * f.nz);
  return Math.hypot(h, rho - f.radius);
}

/**
 * Generalised winding number of a closed mesh at a point: sum of solid angles of the triangles over
 * 4 pi (Van Oosterom & Strackee, IEEE Trans. Biomed. Eng. 30, 1983).
 */
function windingNumber(x: number, y: number, z: number, q: Float64Array, tri: Uint32Array): number {
  let total = 0;
  for (let t = 0; t < tri.length; t += 3) {
    const i = 3 * tri[t]!, j = 3 * tri[t + 1]!, k = 3 * tri[t + 2]!;
    const ax = q[i]! - x, ay = q[i + 1]! - y, az = q[i + 2]! - z;
    const bx = q[j]! - x, by = q[j + 1]! - y, bz = q[j + 2]! - z;
    const cx = q[k]! - x, cy = q[k + 1]! - y, cz = q[k + 2]! - z;
    const la = Math.hypot(ax, ay, az), lb = Math.hypot(bx, by, bz), lc = Math.hypot(cx, cy, cz);
    const det = ax * (by * cz - bz * cy) - ay * (bx * cz - bz * cx) + az * (bx * cy - by * cx);
    const den = la * lb * lc + (ax * bx + ay * by + az * bz) * lc + (bx * cx + by * cy + bz * cz) * la + (cx * ax + cy * ay + cz * az) * lb;
    total += 2 * Math.atan2(det, den);
  }
  return total / (4 * Math.PI);
}

/**
 * Distance from point (x, y, z) to triangle (i, j, k) of q by the Voronoi-region case split
 * (Ericson, "Real-Time Collision Detection", 2005, section 5.1.5). Writes the closest point to out.
 */
export function pointTriangleDistance(
  x: number, y: number, z: number, q: ArrayLike<number>, i: number, j: number, k: number, out: Float64Array,
): number {
  const ax = q[i]!, ay = q[i + 1]!, az = q[i + 2]!;
  const abx = q[j]! - ax, aby = q[j + 1]! - ay, abz = q[j + 2]! - az;
  const acx = q[k]! - ax, acy = q[k + 1]! - ay, acz = q[k + 2]! - az;
  const apx = x - ax, apy = y - ay, apz = z - az;
  const d1 = abx * apx + aby * apy + abz * apz, d2 = acx * apx + acy * apy + acz * apz;
  if (d1 <= 0 && d2 <= 0) return setOut(out, ax, ay, az, x, y, z);
  const bpx = x - q[j]!, bpy = y - q[j + 1]!, bpz = z - q[j + 2]!;
  const d3 = abx * bpx + aby * bpy + abz * bpz, d4 = acx * bpx + acy * bpy + acz * bpz;
  if (d3 >= 0 && d4 <= d3) return setOut(out, q[j]!, q[j + 1]!, q[j + 2]!, x, y, z);
  const vc = d1 * d4 - d3 * d2;
  if (vc <= 0 && d1 >= 0 && d3 <= 0) {
    const v = d1 / (d1 - d3);
    return setOut(out, ax + v * abx, ay + v * aby, az + v * abz, x, y, z);
  }
  const cpx = x - q[k]!, cpy = y - q[k + 1]!, cpz = z - q[k + 2]!;
  const d5 = abx * cpx + aby * cpy + abz * cpz, d6 = acx * cpx + acy * cpy + acz * cpz;
  if (d6 >= 0 && d5 <= d6) return setOut(out, q[k]!, q[k + 1]!, q[k + 2]!, x, y, z);
  const vb = d5 * d2 - d1 * d6;
  if (vb <= 0 && d2 >= 0 && d6 <= 0) {
    const w = d2 / (d2 - d6);
    return setOut(out, ax + w * acx, ay + w * acy, az + w * acz, x, y, z);
  }
  const va = d3 * d6 - d5 * d4;
  if (va <= 0 && d4 - d3 >= 0 && d5 - d6 >= 0) {
    const w = (d4 - d3) / (d4 - d3 + (d5 - d6));
    const bx = q[j]!, by = q[j + 1]!, bz = q[j + 2]!;
    return setOut(out, bx + w * (q[k]! - bx), by + w * (q[k + 1]! - by), bz + w * (q[k + 2]! - bz), x, y, z);
  }
  const denom = 1 / (va + vb + vc);
  const v = vb * denom, w = vc * denom;
  return setOut(out, ax + abx * v + acx * w, ay + aby * v + acy * w, az + abz * v + acz * w, x, y, z);
}

function setOut(out: Float64Array, px: number, py: number, pz: number, x: number, y: number, z: number): number {
  out[0] = px; out[1] = py; out[2] = pz;
  return Math.hypot(x - px, y - py, z - pz);
}
