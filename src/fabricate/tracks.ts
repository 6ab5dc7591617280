// Contact tracks for gear and groove design: for each ring and each neighbour it touches or links,
// the contact points in the ring's body frame, the track each contact sweeps when the ring spins,
// the relative screw motion of the neighbour, and sampled curves of the neighbour swept through the
// ring's frame over one period — the input of an envelope-method tooth generator (Litvin & Fuentes,
// "Gear Geometry and Applied Theory", 2004: the generated surface is the envelope of the family).
import { InputError } from '../model/errors.js';
import type { SolveResult } from '../model/result.js';
import type { SolveStatus, Vec3 } from '../model/types.js';
import { norm, normalize, sub } from '../model/vec.js';
import { bodyFrame, dirToBody, relativeMotion, relativePoint, toBody, toWorld, type BodyFrame, type RelativeMotion, type Spin } from './motion.js';

export const TRACKS_FORMAT = 'thickring-tracks/1';
export const DEFAULT_SAMPLES = 36;
export const MIN_SAMPLES = 4;
/** Beyond this the file grows as samples^2 per pair into the hundreds of megabytes. */
export const MAX_SAMPLES = 360;

export interface TracksOptions {
  /** Turns of the first ring of a pair (lower index) : turns of the second, per period. */
  ratio: [number, number];
  samples: number;
  source?: string;
}

export interface TrackContact {
  /** Angle around the core, measured in planeBasis(normal) (radians). */
  coreAngle: number;
  /** Angle around the tube: 0 points away from the ring centre, pi/2 along the axis (radians). */
  tubeAngle: number;
  /** Contact point on this ring's tube surface, body frame. */
  point: Vec3;
  /** The same point in world (layout) coordinates. */
  world: Vec3;
  /** Core-to-core distance minus both tube radii: 0 for a touching strut (layout units). */
  gap: number;
  continuum: boolean;
  /** Index into `tracks`. */
  track: number;
}

export interface ContactTrack {
  tubeAngle: number;
  /** Circle in the body frame: centre on the axis at height r sin(tubeAngle), radius R + r cos(tubeAngle). */
  center: Vec3;
  axis: Vec3;
  radius: number;
  samples: Vec3[];
}

export interface PairMotion extends RelativeMotion {
  omegaSelf: number;
  omegaNeighbour: number;
  turnsSelf: number;
  turnsNeighbour: number;
  /** One period of the relative motion (time units; speeds are turns per period times 2 pi / period). */
  period: number;
}

export interface Swept {
  times: number[];
  /** Material points of the neighbour's core circle at each time, this ring's body frame. */
  coreCurve: Vec3[][];
  /** For each of those core points, the point of the neighbour's tube circle (meridian) there nearest this ring's core. */
  closestApproach: Vec3[][];
}

export interface Neighbour {
  index: number;
  name: string;
  linking: number | null;
  touching: boolean;
  contacts: TrackContact[];
  tracks: ContactTrack[];
  motion: PairMotion;
  swept: Swept;
}

export interface TrackRing {
  index: number;
  name: string;
  center: Vec3;
  normal: Vec3;
  radius: number;
  tube: number;
  frame: BodyFrame;
  neighbours: Neighbour[];
}

export interface TracksDocument {
  format: typeof TRACKS_FORMAT;
  source: string | null;
  units: string | null;
  angleUnit: 'radian';
  status: SolveStatus;
  tube: number;
  aspectRatio: number;
  ratio: [number, number];
  samples: number;
  rings: TrackRing[];
}

/** Core points closer than this (relative to the larger radius) coincide: the cores cross there. */
const COINCIDENT = 1e-12;
/** Two tube-angle tracks closer than this (radians) are the same circle. */
const SAME_TRACK = 1e-9;

export function buildTracks(result: SolveResult, options: TracksOptions): TracksDocument {
  const [a, b] = checkRatio(options.ratio);
  const samples = options.samples;
  if (!Number.isInteger(samples) || samples < MIN_SAMPLES || samples > MAX_SAMPLES) {
    throw new InputError(`--samples ${samples} must be a whole number from ${MIN_SAMPLES} to ${MAX_SAMPLES}`);
  }
  const rings = result.rings;
  const frames = rings.map((r) => bodyFrame(r.center, r.normal));
  const pairs = neighbourPairs(result);
  const period = 2 * Math.PI;
  const out: TrackRing[] = rings.map((ring, i) => {
    const neighbours: Neighbour[] = [];
    for (const j of pairs[i]!) {
      const other = rings[j]!;
      // The ratio is per pair, first ring (lower index) : second, the same seen from either side.
      const wSelf = i < j ? a : b, wOther = i < j ? b : a;
      const self: Spin = { center: ring.center, axis: frames[i]!.axis, omega: wSelf };
      const spin: Spin = { center: other.center, axis: frames[j]!.axis, omega: wOther };
      const scale = Math.max(ring.radius, other.radius);
      const motion: PairMotion = {
        ...relativeMotion(self, frames[i]!, spin, scale),
        omegaSelf: wSelf,
        omegaNeighbour: wOther,
        turnsSelf: wSelf,
        turnsNeighbour: wOther,
        period,
      };
      const { contacts, tracks } = pairContacts(result, i, j, frames[i]!, samples);
      const link = result.linking?.[i]?.[j];
      neighbours.push({
        index: j,
        name: other.name,
        linking: typeof link === 'number' ? link : null,
        touching: contacts.length > 0,
        contacts,
        tracks,
        motion,
        swept: sweep(result, i, j, frames, self, spin, samples, period),
      });
    }
    return { index: i, name: ring.name, center: ring.center, normal: frames[i]!.axis, radius: ring.radius, tube: ring.tube, frame: frames[i]!, neighbours };
  });
  return {
    format: TRACKS_FORMAT,
    source: options.source ?? null,
    units: result.units,
    angleUnit: 'radian',
    status: result.status,
    tube: result.tube,
    aspectRatio: result.aspectRatio,
    ratio: [a, b],
    samples,
    rings: out,
  };
}

/** Parse "a:b" (non-zero whole numbers; negative turns the other way). */
export function parseRatio(text: string): [number, number] {
  const m = /^\s*(-?\d+)\s*:\s*(-?\d+)\s*$/.exec(text);
  if (!m) throw new InputError(`--ratio '${text}' must be two whole numbers a:b (turns of the first ring : turns of the second), e.g. 1:1 or 2:3`);
  return checkRatio([Number(m[1]), Number(m[2])]);
}

function checkRatio(r: [number, number]): [number, number] {
  const [a, b] = r;
  if (!Number.isInteger(a) || !Number.isInteger(b) || a === 0 || b === 0 || Math.abs(a) > 1000 || Math.abs(b) > 1000) {
    throw new InputError(`--ratio ${a}:${b} must be two non-zero whole numbers up to 1000 in size, e.g. 1:1 or 2:3`);
  }
  // Divide out the common factor so one period is exactly a turns of one ring and b of the other.
  const g = gcd(Math.abs(a), Math.abs(b));
  return [a / g, b / g];
}

function gcd(x: number, y: number): number {
  while (y) [x, y] = [y, x % y];
  return x;
}

/** Neighbours of each ring: rings it has a contact with, and rings it is linked with. */
function neighbourPairs(result: SolveResult): number[][] {
  const n = result.rings.length;
  const sets = Array.from({ length: n }, () => new Set<number>());
  for (const c of result.contacts) {
    sets[c.a]!.add(c.b);
    sets[c.b]!.add(c.a);
  }
  result.linking?.forEach((row, i) => row.forEach((l, j) => {
    if (l !== 0 && i !== j) sets[i]!.add(j);
  }));
  return sets.map((s) => [...s].sort((x, y) => x - y));
}

function pairContacts(result: SolveResult, i: number, j: number, frame: BodyFrame, samples: number): { contacts: TrackContact[]; tracks: ContactTrack[] } {
  const ring = result.rings[i]!, other = result.rings[j]!;
  const R = ring.radius, r = ring.tube;
  const contacts: TrackContact[] = [];
  const tracks: ContactTrack[] = [];
  result.contacts.forEach((c, k) => {
    if (!((c.a === i && c.b === j) || (c.a === j && c.b === i))) return;
    const onSelf = c.a === i ? c.onA : c.onB;
    const onOther = c.a === i ? c.onB : c.onA;
    const toward = sub(onOther, onSelf);
    if (norm(toward) <= COINCIDENT * Math.max(R, other.radius)) {
      throw new InputError(`contacts[${k}]: the core points of rings ${ring.name} and ${other.name} coincide, so the cores cross: use a feasible result`);
    }
    const p = toBody(frame, onSelf);
    const u = normalize(dirToBody(frame, toward));
    const phi = Math.atan2(p[1], p[0]);
    const cphi = Math.cos(phi), sphi = Math.sin(phi);
    const psi = Math.atan2(u[2], u[0] * cphi + u[1] * sphi);
    // Rebuild the point on the exact torus from the two angles so it lies on this ring's tube surface.
    const rho = R + r * Math.cos(psi);
    const point: Vec3 = [rho * cphi, rho * sphi, r * Math.sin(psi)];
    let track = tracks.findIndex((t) => Math.abs(angleDiff(t.tubeAngle, psi)) <= SAME_TRACK);
    if (track < 0) {
      track = tracks.length;
      tracks.push(trackCircle(R, r, psi, samples));
    }
    contacts.push({
      coreAngle: phi,
      tubeAngle: psi,
      point,
      world: toWorld(frame, point),
      gap: c.distance - ring.tube - other.tube,
      continuum: c.continuum === true,
      track,
    });
  });
  return { contacts, tracks };
}

function trackCircle(R: number, r: number, psi: number, samples: number): ContactTrack {
  const radius = R + r * Math.cos(psi), h = r * Math.sin(psi);
  const pts: Vec3[] = [];
  for (let k = 0; k < samples; k++) {
    const th = (2 * Math.PI * k) / samples;
    pts.push([radius * Math.cos(th), radius * Math.sin(th), h]);
  }
  return { tubeAngle: psi, center: [0, 0, h], axis: [0, 0, 1], radius, samples: pts };
}

function sweep(result: SolveResult, i: number, j: number, frames: BodyFrame[], self: Spin, other: Spin, samples: number, period: number): Swept {
  const R = result.rings[i]!.radius;
  const Rj = result.rings[j]!.radius, rj = result.rings[j]!.tube;
  const fj = frames[j]!;
  // Material points of the neighbour: a core point and two points fixing its meridian circle
  // (radial and axial offsets of length rj), so the rigid map carries the whole meridian along.
  const core: Vec3[] = [], radial: Vec3[] = [], axial: Vec3[] = [];
  for (let k = 0; k < samples; k++) {
    const th = (2 * Math.PI * k) / samples;
    const c = Math.cos(th), sn = Math.sin(th);
    core.push(toWorld(fj, [Rj * c, Rj * sn, 0]));
    radial.push(toWorld(fj, [(Rj + rj) * c, (Rj + rj) * sn, 0]));
    axial.push(toWorld(fj, [Rj * c, Rj * sn, rj]));
  }
  const times: number[] = [], coreCurve: Vec3[][] = [], closestApproach: Vec3[][] = [];
  for (let s = 0; s < samples; s++) {
    const t = (period * s) / samples;
    times.push(t);
    const curve: Vec3[] = [], near: Vec3[] = [];
    for (let k = 0; k < samples; k++) {
      const q = relativePoint(self, frames[i]!, other, core[k]!, t);
      const a = relativePoint(self, frames[i]!, other, radial[k]!, t);
      const b = relativePoint(self, frames[i]!, other, axial[k]!, t);
      curve.push(q);
      near.push(meridianClosest(q, a, b, R));
    }
    coreCurve.push(curve);
    closestApproach.push(near);
  }
  return { times, coreCurve, closestApproach };
}

/** Coarse samples around a meridian before refining (the global minimum lies within one step). */
const MERIDIAN_SAMPLES = 24;
const GOLDEN_STEPS = 48;

/**
 * Point of the meridian circle m(psi) = q + cos(psi)(a - q) + sin(psi)(b - q) nearest to this ring's
 * core (centre 0, axis z, radius R, body frame): coarse sampling, then golden-section search.
 */
function meridianClosest(q: Vec3, a: Vec3, b: Vec3, R: number): Vec3 {
  const u = sub(a, q), v = sub(b, q);
  const at = (psi: number): Vec3 => {
    const c = Math.cos(psi), s = Math.sin(psi);
    return [q[0] + c * u[0] + s * v[0], q[1] + c * u[1] + s * v[1], q[2] + c * u[2] + s * v[2]];
  };
  const f = (psi: number): number => {
    const p = at(psi);
    return Math.hypot(p[2], Math.hypot(p[0], p[1]) - R);
  };
  let best = 0, fb = Infinity;
  const step = (2 * Math.PI) / MERIDIAN_SAMPLES;
  for (let k = 0; k < MERIDIAN_SAMPLES; k++) {
    const fk = f(k * step);
    if (fk < fb) { fb = fk; best = k * step; }
  }
  const g = (Math.sqrt(5) - 1) / 2;
  let lo = best - step, hi = best + step;
  let x1 = hi - g * (hi - lo), x2 = lo + g * (hi - lo), f1 = f(x1), f2 = f(x2);
  for (let it = 0; it < GOLDEN_STEPS; it++) {
    if (f1 < f2) { hi = x2; x2 = x1; f2 = f1; x1 = hi - g * (hi - lo); f1 = f(x1); }
    else { lo = x1; x1 = x2; f1 = f2; x2 = lo + g * (hi - lo); f2 = f(x2); }
  }
  return at((lo + hi) / 2);
}

function angleDiff(x: number, y: number): number {
  return Math.atan2(Math.sin(x - y), Math.cos(x - y));
}
