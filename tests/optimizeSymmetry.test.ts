// Symmetry groups on ring arrangements: option parsing, orbit detection (including a ring mapped to itself),
// symmetrisation and the departure measure, checked against hand-derived closed forms.
import { describe, expect, it } from 'vitest';
import { star } from './optimizeLayouts.js';
import { InputError } from '../src/model/errors.js';
import {
  applySymmetry, parseSymmetryOption, ringOrbits, symmetrize, symmetryDeparture, symmetryElements,
} from '../src/model/symmetry.js';
import type { Ring, Symmetry } from '../src/model/types.js';
import { torusLinkStart } from '../src/optimize/run/testPoses.js';
import { linkingMatrix } from '../src/topology/index.js';

const C3: Symmetry = { type: 'cyclic', order: 3, axis: [0, 0, 1], origin: [0, 0, 0] };
const D3: Symmetry = { type: 'dihedral', order: 3, axis: [0, 0, 1], origin: [0, 0, 0] };

describe('parseSymmetryOption', () => {
  it('parses none, cyclic:N and dihedral:N with the axis along z', () => {
    expect(parseSymmetryOption('none', 5)).toBeNull();
    expect(parseSymmetryOption('cyclic:3', 6)).toEqual({ type: 'cyclic', order: 3, axis: [0, 0, 1], origin: [0, 0, 0] });
    expect(parseSymmetryOption('dihedral:2', 4)?.type).toBe('dihedral');
    // One ring on the axis (a star's centre ring) is allowed: 4 rings, cyclic:3.
    expect(parseSymmetryOption('cyclic:3', 4)?.order).toBe(3);
  });

  it('rejects malformed options and orders that do not divide the ring count, naming --symmetry', () => {
    for (const bad of ['cyclic', 'cyclic:', 'cyclic:x', 'twisted:3', 'cyclic:0', 'cyclic:-2']) {
      expect(() => parseSymmetryOption(bad, 6)).toThrow(InputError);
      expect(() => parseSymmetryOption(bad, 6)).toThrow(/--symmetry/);
    }
    expect(() => parseSymmetryOption('cyclic:4', 7)).toThrow(/--symmetry cyclic:4: 4 does not divide the ring count 7/);
  });
});

describe('group elements and orbits', () => {
  it('C_N has N rotations, D_N adds N half-turns; all are proper rotations', () => {
    // Group orders: |C_N| = N, |D_N| = 2N (any algebra text).
    expect(symmetryElements(C3)).toHaveLength(3);
    const d = symmetryElements(D3);
    expect(d).toHaveLength(6);
    for (const M of d) {
      const det = M[0] * (M[4] * M[8] - M[5] * M[7]) - M[1] * (M[3] * M[8] - M[5] * M[6]) + M[2] * (M[3] * M[7] - M[4] * M[6]);
      expect(Math.abs(det - 1)).toBeLessThan(1e-14);
    }
    // The first half-turn is about x (convention documented in symmetry.ts): it maps (0, 1, 0) to (0, -1, 0).
    const f = d[3]!;
    expect(Math.abs(f[4] + 1)).toBeLessThan(1e-14);
  });

  it('finds one orbit of three rings for the (3,3) torus link under C3', () => {
    const rings = torusLinkStart(3, 1);
    const o = ringOrbits(rings, C3);
    expect(o.orbits).toHaveLength(1);
    expect(o.orbits[0]!.slice().sort()).toEqual([0, 1, 2]);
    // Rotating by 120° about z permutes the rings cyclically: no ring is fixed and three turns are the identity.
    const p = o.perms[1]!;
    expect(p.every((j, i) => j !== i)).toBe(true);
    expect(p.map((_, i) => p[p[p[i]!]!])).toEqual([0, 1, 2]);
  });

  it('keeps a centre ring on the axis as its own orbit, under C3 and D3', () => {
    const rings = star(3);
    for (const sym of [C3, D3]) {
      const o = ringOrbits(rings, sym);
      expect(o.orbits).toHaveLength(2);
      expect(o.orbits.find((orb) => orb.includes(0))).toEqual([0]);
      // Under the half-turn about x the centre ring's normal flips: recorded as sign -1, not a new ring.
      if (sym === D3) expect(o.signs[3]![0]).toBe(-1);
    }
  });

  it('rejects an arrangement that cannot carry the symmetry', () => {
    // Two equal rings off the axis: a 120° turn can only swap them, and three swaps are not the identity.
    const rings: Ring[] = [
      { name: 'A', center: [2, 0, 0], normal: [0, 0, 1], radius: 1 },
      { name: 'B', center: [-2, 0, 0], normal: [0, 0, 1], radius: 1 },
    ];
    expect(() => ringOrbits(rings, C3)).toThrow(InputError);
    expect(() => ringOrbits(rings, C3)).toThrow(/not arranged with this symmetry/);
  });
});

describe('symmetrize and symmetryDeparture', () => {
  it('leaves a symmetric arrangement alone (departure 0) and is idempotent', () => {
    const rings = torusLinkStart(3, 1);
    expect(symmetryDeparture(rings, C3)).toBeLessThan(1e-14);
    const s = symmetrize(rings, C3);
    const s2 = symmetrize(s, C3);
    s.forEach((r, i) => {
      for (let k = 0; k < 3; k++) {
        expect(Math.abs(r.center[k]! - rings[i]!.center[k]!)).toBeLessThan(1e-14);
        expect(Math.abs(s2[i]!.normal[k]! - r.normal[k]!)).toBeLessThan(1e-14);
      }
    });
    expect(linkingMatrix(s)).toEqual(linkingMatrix(rings));
  });

  it('moving one ring of a C3 orbit by v gives departure |v| √2 / 3', () => {
    // Derivation (by hand): the group average moves ring 0 by v/3 and its images by M v/3, M² v/3, so the
    // residuals are 2v/3, -Mv/3, -M²v/3 and the mean square is (4 + 1 + 1)/27 |v|² = 2|v|²/9.
    const rings = torusLinkStart(3, 1);
    const v = [0.03, -0.02, 0.01];
    const moved = rings.map((r, i) => (i === 0 ? { ...r, center: [r.center[0] + v[0]!, r.center[1] + v[1]!, r.center[2] + v[2]!] as Ring['center'] } : r));
    const expected = (Math.hypot(...v) * Math.SQRT2) / 3;
    expect(Math.abs(symmetryDeparture(moved, C3) - expected)).toBeLessThan(1e-14);
    // Symmetrising removes it, and applySymmetry regenerates the images from the representatives.
    const back = symmetrize(moved, C3);
    expect(symmetryDeparture(back, C3)).toBeLessThan(1e-14);
    const regen = applySymmetry(back, ringOrbits(back, C3));
    regen.forEach((r, i) => expect(Math.hypot(r.center[0] - back[i]!.center[0], r.center[1] - back[i]!.center[1], r.center[2] - back[i]!.center[2])).toBeLessThan(1e-14));
  });
});
