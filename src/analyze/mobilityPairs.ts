// Which rings can touch during the mobility and play analyses. Without a lattice: every pair once. With a
// lattice (a weave): also every ring against the translated copies of every ring in nearby cells. A copy
// moves with its ring (periodic motion) in the first- and second-order analyses; in the finite play only
// the chosen ring moves and every copy, even its own, stays put.
import { ringPairs } from '../model/ringPairs.js';
import type { Lattice, Vec3 } from '../model/types.js';
import type { RingPose } from './mobilityMotion.js';

export interface ImagePair {
  a: number;
  b: number;
  /** Translation of ring b's copy (layout units); [0,0,0] inside the cell. */
  offset: Vec3;
}

/** Pairs whose bounding spheres come within `margin` (plus every pair of the cell). */
export function imagePairs(rings: readonly RingPose[], lattice: Lattice | null, margin: number): ImagePair[] {
  const list = ringPairs({ rings: rings.map((r) => ({ ...r })), ...(lattice ? { lattice } : {}) }, margin);
  return list.map((p) => ({ a: p.i, b: p.j, offset: p.offset }));
}

/** Ring r translated by offset. */
export function shifted(r: RingPose, offset: Vec3): RingPose {
  if (offset[0] === 0 && offset[1] === 0 && offset[2] === 0) return r;
  return { ...r, center: [r.center[0] + offset[0], r.center[1] + offset[1], r.center[2] + offset[2]] };
}

/** Name of a copy of a ring: "B" inside the cell, "B+(0, 2.5, 0)" for the copy shifted by that much. */
export function copyName(name: string, offset: Vec3): string {
  const o = offset;
  return o[0] === 0 && o[1] === 0 && o[2] === 0 ? name : `${name}+(${o.map((c) => Number(c.toPrecision(6))).join(', ')})`;
}
