// Library entry point of the kernel: allocating wrapper around the hot-path circleContacts.
import type { Circle, Vec3 } from '../model/types.js';
import { basisInto, wrapAngle } from './frame.js';
import {
  circleContacts, lastCertifiedResult, lastContinuum, CONTACT_STRIDE, MAX_CONTACTS, type ContinuumKind,
} from './circleDistance.js';

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

/** Library entry point: normals need not be unit; allocation is fine here. */
export function ringDistance(a: Circle, b: Circle): RingDistance {
  const nA = unit(a.normal), nB = unit(b.normal);
  const out = new Float64Array(MAX_CONTACTS * CONTACT_STRIDE);
  const count = circleContacts(a.center, nA, a.radius, b.center, nB, b.radius, out);
  const kind = lastContinuum();
  const certified = lastCertifiedResult();
  const eB = new Float64Array(6);
  basisInto(nB[0], nB[1], nB[2], eB);
  const contacts: Contact[] = [];
  let distance = Infinity;
  for (let i = 0; i < count; i++) {
    const o = i * CONTACT_STRIDE;
    const onA: Vec3 = [out[o + 2]!, out[o + 3]!, out[o + 4]!];
    const onB: Vec3 = [out[o + 5]!, out[o + 6]!, out[o + 7]!];
    const qx = onB[0] - b.center[0]!, qy = onB[1] - b.center[1]!, qz = onB[2] - b.center[2]!;
    const angleB = wrapAngle(Math.atan2(qx * eB[3] + qy * eB[4] + qz * eB[5], qx * eB[0] + qy * eB[1] + qz * eB[2]));
    const d = out[o + 1]!;
    if (d < distance) distance = d;
    contacts.push({ onA, onB, distance: d, angleA: out[o]!, angleB });
  }
  return {
    distance,
    contacts,
    degenerate: kind !== null,
    continuum: kind === null ? null : { kind, description: describe(kind, distance) },
    certified,
  };
}

function unit(v: ArrayLike<number>): Vec3 {
  const l = Math.hypot(v[0]!, v[1]!, v[2]!);
  return [v[0]! / l, v[1]! / l, v[2]! / l];
}

function describe(kind: ContinuumKind, d: number): string {
  return kind === 'coaxial'
    ? `coaxial circles: every point of A is at the same distance ${d} from B`
    : `A lies on the tube of radius ${d} around B: a whole circle of closest pairs`;
}
