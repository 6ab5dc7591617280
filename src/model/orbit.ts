// The full set of contacts of a symmetric result. A solve under a symmetry group works on one ring per orbit,
// so its certificate lists the contacts of the representatives only; every image of a contact under the group
// touches just as much. Downstream commands (tracks, report, play, fabricate) must see them all.
import type { ResultContact } from './result.js';
import { mulVec, ringOrbits } from './symmetry.js';
import type { Ring, Symmetry, Vec3 } from './types.js';

/** Two contact points closer than this, relative to the largest ring, are one contact. */
const SAME_POINT_REL = 1e-7;

/**
 * Every image of every contact under the symmetry, each pair once with a < b, duplicates (contacts mapped
 * onto themselves or onto one another) kept once. Each image carries its representative's force; forces are
 * then scaled to sum to 1 again, as the result file states.
 */
export function expandContactOrbits(contacts: readonly ResultContact[], rings: readonly Ring[], symmetry: Symmetry | null): ResultContact[] {
  if (symmetry === null || symmetry.type === 'none' || contacts.length === 0) return contacts.map((c) => ({ ...c }));
  const orbits = ringOrbits(rings, symmetry);
  const o = orbits.origin;
  const scale = Math.max(...rings.map((r) => r.radius + Math.hypot(r.center[0] - o[0], r.center[1] - o[1], r.center[2] - o[2])));
  const tol = SAME_POINT_REL * scale;
  const map = (M: Parameters<typeof mulVec>[0], p: Vec3): Vec3 => {
    const q = mulVec(M, [p[0] - o[0], p[1] - o[1], p[2] - o[2]]);
    return [q[0] + o[0], q[1] + o[1], q[2] + o[2]];
  };
  const out: ResultContact[] = [];
  orbits.elements.forEach((M, g) => {
    for (const c of contacts) {
      let a = orbits.perms[g]![c.a]!, b = orbits.perms[g]![c.b]!;
      let onA = map(M, c.onA), onB = map(M, c.onB);
      if (a > b) {
        [a, b] = [b, a];
        [onA, onB] = [onB, onA];
      }
      const dup = out.some((k) => k.a === a && k.b === b && near(k.onA, onA, tol) && near(k.onB, onB, tol));
      if (!dup) out.push({ ...c, a, b, onA, onB });
    }
  });
  const total = out.reduce((s, k) => s + k.force, 0);
  if (total > 0) for (const k of out) k.force /= total;
  return out;
}

function near(p: Vec3, q: Vec3, tol: number): boolean {
  return Math.abs(p[0] - q[0]) <= tol && Math.abs(p[1] - q[1]) <= tol && Math.abs(p[2] - q[2]) <= tol;
}

/** The smallest aspect ratio over the rings and the ring it belongs to (first on ties). */
export function tightestRing(rings: readonly { name: string; aspectRatio: number }[]): { aspectRatio: number; aspectRatioRing: string } {
  let best = 0;
  for (let i = 1; i < rings.length; i++) if (rings[i]!.aspectRatio < rings[best]!.aspectRatio) best = i;
  return { aspectRatio: rings[best]?.aspectRatio ?? NaN, aspectRatioRing: rings[best]?.name ?? '' };
}
