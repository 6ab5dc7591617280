// Library entry point of the kernel: the hot-path circleContacts wrapped in plain objects. Scratch buffers are
// module-level (one query at a time per module copy); only the returned objects are allocated.
import type { Circle, Vec3 } from '../model/types.js';
import { basisInto, wrapAngle } from './frame.js';
import {
  circleContacts, lastCertifiedResult, lastContinuum, lastContinuumSides, CONTACT_STRIDE, CONTINUUM_REL_TOL, MAX_CONTACTS,
  type ContinuumKind,
} from './circleDistance.js';
import { pointCircleDistance } from './pointCircle.js';

export interface Contact {
  onA: Vec3;
  onB: Vec3;
  distance: number;
  /** Angle of onA around A's core, measured in planeBasis(nA). */
  angleA: number;
  /** Angle of onB around B's core, measured in planeBasis(nB). */
  angleB: number;
}

export interface RingDistance {
  /** Global minimum distance between the two core circles. */
  distance: number;
  /** Every local minimum of the distance (struts); for a continuum, evenly spaced representatives. */
  contacts: Contact[];
  degenerate: boolean;
  continuum: { kind: ContinuumKind; description: string } | null;
  /**
   * True when every local minimum was isolated with certified bounds (or the pair is an exact continuum).
   * False in the near-continuum regime, where minima shallower than ~1e-8 of the squared size may be merged.
   */
  certified: boolean;
}

const OUT = new Float64Array(MAX_CONTACTS * CONTACT_STRIDE);
const NA = new Float64Array(3);
const NB = new Float64Array(3);
const EB = new Float64Array(6);

/**
 * Library entry point: normals need not be unit. The answer does not depend on the order of a and b: the
 * kernel parametrises the ring that comes first in a fixed order of the data (radius, then centre, then normal)
 * and the result is swapped back. Each order alone finds the same pairs (tests/properties/kernel.props.ts), but
 * the continuum tests of the two sides are different computations, so a pair within rounding of their
 * tolerance could otherwise be called degenerate from one side only.
 */
export function ringDistance(a: Circle, b: Circle): RingDistance {
  return firstInOrder(b, a) ? ringDistanceOneSided(b, a, true) : ringDistanceOneSided(a, b, false);
}

/**
 * The kernel's answer parametrising a (its contacts' onA lie on a), reported as ringDistance(a, b) would, or
 * as ringDistance(b, a) when `swap` (points and angles exchanged). For tests of each side of the method.
 */
export function ringDistanceOneSided(a: Circle, b: Circle, swap = false): RingDistance {
  unitInto(a.normal, NA);
  unitInto(b.normal, NB);
  const count = circleContacts(a.center, NA, a.radius, b.center, NB, b.radius, OUT);
  const kind = lastContinuum();
  let sides = lastContinuumSides();
  const certified = lastCertifiedResult();
  basisInto(NB[0]!, NB[1]!, NB[2]!, EB);
  const e1x = EB[0]!, e1y = EB[1]!, e1z = EB[2]!, e2x = EB[3]!, e2y = EB[4]!, e2z = EB[5]!;
  const bx = b.center[0]!, by = b.center[1]!, bz = b.center[2]!;
  const contacts: Contact[] = new Array(count);
  let distance = Infinity;
  for (let i = 0; i < count; i++) {
    const o = i * CONTACT_STRIDE;
    const qx = OUT[o + 5]!, qy = OUT[o + 6]!, qz = OUT[o + 7]!;
    const ux = qx - bx, uy = qy - by, uz = qz - bz;
    const d = OUT[o + 1]!;
    if (d < distance) distance = d;
    const pa: Vec3 = [OUT[o + 2]!, OUT[o + 3]!, OUT[o + 4]!], pb: Vec3 = [qx, qy, qz];
    const ta = OUT[o]!, tb = wrapAngle(Math.atan2(ux * e2x + uy * e2y + uz * e2z, ux * e1x + uy * e1y + uz * e1z));
    contacts[i] = swap ? { onA: pb, onB: pa, distance: d, angleA: tb, angleB: ta } : { onA: pa, onB: pb, distance: d, angleA: ta, angleB: tb };
  }
  if (swap) sides = ((sides & 1) << 1) | ((sides & 2) >> 1);
  return {
    distance,
    contacts,
    degenerate: kind !== null,
    continuum: kind === null ? null : { kind, description: swap ? describe(kind, sides, distance, b, a) : describe(kind, sides, distance, a, b) },
    certified,
  };
}

/** Whether x comes strictly before y in the fixed order: radius, then centre, then normal, component by component. */
function firstInOrder(x: Circle, y: Circle): boolean {
  if (x.radius !== y.radius) return x.radius < y.radius;
  for (let k = 0; k < 3; k++) if (x.center[k] !== y.center[k]) return x.center[k]! < y.center[k]!;
  for (let k = 0; k < 3; k++) if (x.normal[k] !== y.normal[k]) return x.normal[k]! < y.normal[k]!;
  return false;
}

function unitInto(v: ArrayLike<number>, out: Float64Array): void {
  const x = v[0]!, y = v[1]!, z = v[2]!;
  const l = Math.sqrt(x * x + y * y + z * z);
  out[0] = x / l; out[1] = y / l; out[2] = z / l;
}

/** Samples for telling whether the other ring also lies on a tube (only for the description). */
const SIDE_SAMPLES = 64;

function describe(kind: ContinuumKind, sides: number, d: number, a: Circle, b: Circle): string {
  if (kind === 'coaxial') return `coaxial circles: every point of A is at the same distance ${d} from B`;
  // The kernel reports the family it found; the other ring may lie on a tube too (a Villarceau circle and the
  // torus core: both do). Say so either way so the description does not depend on the argument order.
  const aOn = (sides & 1) !== 0 || onTube(a, b, d);
  const bOn = (sides & 2) !== 0 || onTube(b, a, d);
  if (aOn && bOn) return `each ring lies on the tube of radius ${d} around the other: whole circles of closest pairs`;
  return aOn
    ? `A lies on the tube of radius ${d} around B: a whole circle of closest pairs`
    : `B lies on the tube of radius ${d} around A: a whole circle of closest pairs`;
}

/** Whether every sampled point of x is at distance d from y (to the continuum tolerance). */
function onTube(x: Circle, y: Circle, d: number): boolean {
  const n = [x.normal[0]!, x.normal[1]!, x.normal[2]!];
  const l = Math.hypot(n[0]!, n[1]!, n[2]!);
  basisInto(n[0]! / l, n[1]! / l, n[2]! / l, EB);
  const L = x.radius + y.radius + Math.hypot(x.center[0]! - y.center[0]!, x.center[1]! - y.center[1]!, x.center[2]! - y.center[2]!);
  const ny = [y.normal[0]!, y.normal[1]!, y.normal[2]!];
  const ly = Math.hypot(ny[0]!, ny[1]!, ny[2]!);
  for (let j = 0; j < 3; j++) ny[j]! /= ly;
  const p = [0, 0, 0];
  for (let k = 0; k < SIDE_SAMPLES; k++) {
    const t = ((k + 0.5) * 2 * Math.PI) / SIDE_SAMPLES;
    for (let j = 0; j < 3; j++) p[j] = x.center[j]! + x.radius * (EB[j]! * Math.cos(t) + EB[3 + j]! * Math.sin(t));
    if (Math.abs(pointCircleDistance(p, y.center, ny, y.radius) - d) > CONTINUUM_REL_TOL * L) return false;
  }
  return true;
}
