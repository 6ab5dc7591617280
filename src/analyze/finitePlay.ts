// Finite play: how far each ring can move on its own (every other ring held still) before its tube
// touches another tube, along ±x, ±y, ±z and turning about its two in-plane axes.
// The clearance c(s) = min_j (d_ij(s) - r_i - r_j) is Lipschitz along a rigid motion of one ring: a
// translation moves every point of the ring by s (constant 1), a turn about an axis through its centre by
// at most R_i per radian. Stepping by c/Lipschitz ("sphere tracing") therefore never steps over a contact;
// the first touch is then bracketed and bisected.
import { ringDistance } from '../kernel/index.js';
import type { Lattice, Vec3 } from '../model/types.js';
import { copyName, imagePairs, shifted } from './mobilityPairs.js';
import { planeBasis } from '../model/vec.js';
import { moveRing, type RingPose } from './mobilityMotion.js';

export type PlayKind = 'translate' | 'rotate';

export interface PlayEntry {
  /** '+x', '-x', ..., '+u', '-u', '+v', '-v' (u, v: the ring's in-plane axes). */
  direction: string;
  kind: PlayKind;
  axis: Vec3;
  /** Layout units for translations, degrees for rotations. */
  amount: number;
  /** True when the ring moved the whole cap without touching: "free beyond cap". */
  capped: boolean;
  /** Name of the ring it touches first; null when capped. */
  touches: string | null;
  /** True when the search stopped on its step budget before touching (amount is a lower bound). */
  budgetExhausted: boolean;
}

export interface RingPlay {
  name: string;
  /** In-plane axes u, v of the rotations (planeBasis of the ring normal). */
  axes: { u: Vec3; v: Vec3 };
  entries: PlayEntry[];
  /** Turning about its own normal never changes a round ring's tube. */
  spin: 'free';
  /** Clearance to the nearest other tube at the start (layout units). */
  clearance: number;
}

export interface PlayTable {
  /** Common tube radius the play was measured at (layout units); ring i has tube * ratio_i. */
  tube: number;
  translationCap: number;
  rotationCapDegrees: number;
  rings: RingPlay[];
}

export interface PlayOptions {
  /** Largest translation searched (layout units); default 4 x the largest core radius. */
  translationCap?: number;
  /** Largest turn searched (degrees); default 180 (a ring turned by 180° about an in-plane axis is itself). */
  rotationCapDegrees?: number;
  /** Overlap allowed at the start (optimizer rounding), layout units. */
  touchTol: number;
  /** Translational periodicity of a weave: every copy in nearby cells (even the ring's own) stays put. */
  lattice?: Lattice | null;
  /** Called before each ring's search (progress on large sets). */
  onRing?: (index: number, count: number) => void;
}

/** Step budget per direction; sliding along a contact is the slow case. */
const MAX_STEPS = 4000;
/** Bisection resolution and smallest step, relative to the largest core radius. */
const RESOLUTION_REL = 1e-9;
/** Clearance changes below this (relative to the largest core radius) are rounding. */
const NOISE_REL = 1e-11;

export function finitePlay(rings: readonly RingPose[], tube: number, options: PlayOptions): PlayTable {
  const Rmax = Math.max(...rings.map((r) => r.radius), 0);
  const translationCap = options.translationCap ?? 4 * Rmax;
  const rotationCapDegrees = options.rotationCapDegrees ?? 180;
  const axesX: [string, Vec3][] = [['+x', [1, 0, 0]], ['-x', [-1, 0, 0]], ['+y', [0, 1, 0]], ['-y', [0, -1, 0]], ['+z', [0, 0, 1]], ['-z', [0, 0, -1]]];
  return {
    tube,
    translationCap,
    rotationCapDegrees,
    rings: rings.map((r, i) => {
      options.onRing?.(i, rings.length);
      const [u, v] = planeBasis(r.normal);
      const others = obstacles(rings, i, options.lattice ?? null, translationCap + r.radius);
      const entries: PlayEntry[] = [];
      for (const [label, axis] of axesX) entries.push(ringPlay(rings, i, 'translate', axis, translationCap, options.touchTol, label, others));
      const turns: [string, Vec3][] = [['+u', u], ['-u', [-u[0], -u[1], -u[2]]], ['+v', v], ['-v', [-v[0], -v[1], -v[2]]]];
      for (const [label, axis] of turns) entries.push(ringPlay(rings, i, 'rotate', axis, rotationCapDegrees, options.touchTol, label, others));
      return { name: r.name, axes: { u, v }, entries, spin: 'free' as const, clearance: clearanceWho(others, r).gap };
    }),
  };
}

/**
 * How far ring i moves along one rigid motion (translation along unit `axis`, or a turn about the axis
 * through its centre) before its tube touches another: layout units or degrees, at most `cap`.
 * `others` are the rings it can meet (default: every other ring, no lattice).
 */
export function ringPlay(
  rings: readonly RingPose[], i: number, kind: PlayKind, axis: Vec3, cap: number, touchTol: number, label = '',
  others: readonly RingPose[] = rings.filter((_, j) => j !== i),
): PlayEntry {
  const ring = rings[i]!;
  const Rmax = Math.max(...rings.map((r) => r.radius));
  // Work in layout units of arc: s along the motion moves no point of the ring further than s.
  const lip = kind === 'translate' ? 1 : ring.radius;
  const capS = kind === 'translate' ? cap : (cap * Math.PI) / 180;
  const at = (s: number): { gap: number; who: number } => {
    const moved = kind === 'translate'
      ? moveRing(ring, [axis[0] * s, axis[1] * s, axis[2] * s], [0, 0, 0])
      : moveRing(ring, [0, 0, 0], [axis[0] * s, axis[1] * s, axis[2] * s]);
    return clearanceWho(others, moved);
  };
  const resolution = RESOLUTION_REL * Rmax / lip;
  const start = at(0);
  // Blocked = more overlapped than at the start (optimizer output may start a hair inside).
  const floor = Math.min(0, start.gap) - NOISE_REL * Rmax;
  const base = { direction: label, kind, axis, budgetExhausted: false };
  const amount = (s: number): number => (kind === 'translate' ? s : (s * 180) / Math.PI);
  if (start.gap < -touchTol) return { ...base, amount: 0, capped: false, touches: nameOf(others, start.who) };
  // The largest step taken while sliding on a contact: a quarter of the thinnest tube, so a jump cannot
  // cross a whole tube.
  const thin = Math.min(...rings.map((r) => r.tube).filter((t) => t > 0), Rmax);
  const maxBlind = (0.25 * thin) / lip;
  let s = 0, gap = start.gap, blind = resolution;
  for (let step = 0; step < MAX_STEPS; step++) {
    if (s >= capS) return { ...base, amount: amount(capS), capped: true, touches: null };
    const safe = Math.max(gap, 0) / lip;
    const useBlind = safe < blind;
    const next = Math.min(s + (useBlind ? blind : safe), capS);
    const g = at(next);
    if (g.gap >= floor) {
      s = next;
      gap = g.gap;
      blind = useBlind ? Math.min(2 * blind, maxBlind) : resolution;
      continue;
    }
    // First touch lies in (s, next]: bisect on "not more overlapped than at the start".
    let lo = s, hi = next, who = g.who;
    while (hi - lo > resolution) {
      const mid = 0.5 * (lo + hi);
      const gm = at(mid);
      if (gm.gap >= floor) lo = mid;
      else {
        hi = mid;
        who = gm.who;
      }
    }
    return { ...base, amount: amount(lo), capped: false, touches: nameOf(others, who) };
  }
  return { ...base, amount: amount(s), capped: false, touches: null, budgetExhausted: true };
}

/**
 * The rings ring i can meet within `reach` of its centre: the others of the cell and, with a lattice, the
 * copies of every ring (its own too) in nearby cells, named with their shift.
 */
function obstacles(rings: readonly RingPose[], i: number, lattice: Lattice | null, reach: number): RingPose[] {
  const maxTube = Math.max(0, ...rings.map((r) => r.tube));
  const out: RingPose[] = [];
  for (const p of imagePairs(rings, lattice, reach + 2 * maxTube)) {
    const copy = (j: number, o: Vec3): void => {
      out.push({ ...shifted(rings[j]!, o), name: copyName(rings[j]!.name, o) });
    };
    const minus: Vec3 = [-p.offset[0], -p.offset[1], -p.offset[2]];
    if (p.a === i && p.b === i) {
      copy(i, p.offset);
      copy(i, minus);
    } else if (p.a === i) copy(p.b, p.offset);
    else if (p.b === i) copy(p.a, minus);
  }
  return out;
}

/** Smallest clearance between `moved` and every ring of `others`, and which one. */
function clearanceWho(others: readonly RingPose[], moved: RingPose): { gap: number; who: number } {
  let gap = Infinity, who = -1;
  for (let j = 0; j < others.length; j++) {
    const o = others[j]!;
    const sum = moved.tube + o.tube;
    // Bounding spheres first: cores farther apart than this cannot be the nearest.
    const dc = Math.hypot(moved.center[0] - o.center[0], moved.center[1] - o.center[1], moved.center[2] - o.center[2]);
    const lower = dc - moved.radius - o.radius - sum;
    if (lower >= gap) continue;
    const g = ringDistance(moved, o).distance - sum;
    if (g < gap) {
      gap = g;
      who = j;
    }
  }
  return { gap, who };
}

function nameOf(rings: readonly RingPose[], j: number): string | null {
  return j >= 0 ? rings[j]!.name : null;
}
