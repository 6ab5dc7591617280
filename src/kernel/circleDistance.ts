// API under construction; the implementation lands with the kernel issue.
import type { Circle, Vec3 } from '../model/types.js';

/** Floats per contact in the raw output buffer: [angleA, distance, pA(3), pB(3)]. */
export const CONTACT_STRIDE = 8;
/** At most 4 local minima exist (degree-8 stationary equation); continua are sampled with this many points. */
export const MAX_CONTACTS = 16;

export type ContinuumKind = 'coaxial' | 'on-tube';

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
}

export function ringDistance(_a: Circle, _b: Circle): RingDistance {
  throw new Error('kernel not yet implemented');
}
