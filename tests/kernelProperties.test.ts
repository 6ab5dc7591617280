// Property families of the circle–circle kernel (tests/properties/kernel.props.ts) with a small seeded count, so
// CI stays fast; the fuzz runner runs the same families for a long time budget. Each family's check compares the
// kernel with the independent brute force (tests/reference/bruteCircle.ts), with closed forms (references.md,
// hand derivations named in the family), and with itself in the other argument order.
import { describe, it } from 'vitest';
import fc from 'fast-check';
import { families } from './properties/kernel.props.js';

/** Cases per family (44 families; the brute force costs ~10-30 ms a case). */
const RUNS = 4;
const SEED = 20261204;

describe('kernel properties (fast-check, seeded)', () => {
  for (const f of families) {
    it(f.name, () => {
      fc.assert(fc.property(f.arbitrary, (x) => { f.check(x); }), { numRuns: RUNS, seed: SEED });
    });
  }
});
