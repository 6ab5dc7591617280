// Every fuzz family in tests/properties/*.props.ts (found at run time, so new files join by themselves),
// each run with a fixed seed and a small count so the whole file stays CI-sized. The long run with fresh
// seeds and a time budget is `npm run fuzz` (bench/fuzz.ts).
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { loadFamilies } from './properties/loadFamilies.js';

/** Cases of a family that does not say how many it wants in CI. */
const DEFAULT_RUNS = 25;
/** One seed for the CI run, so a failure reproduces exactly. */
const SEED = 20261204;

const loaded = await loadFamilies();

describe('fuzz families (seeded, CI-sized)', () => {
  it('finds the families', () => {
    // The three input families of this suite at least (tests/properties/layout.props.ts, cli.props.ts).
    expect(loaded.map((f) => f.name)).toEqual(expect.arrayContaining(['layout-json', 'layout-mutated', 'result-mutated']));
  });
  for (const family of loaded) {
    const runs = family.runs ?? DEFAULT_RUNS;
    if (runs === 0) continue;
    it(`${family.file}: ${family.name} (${runs} cases, seed ${SEED})`, async () => {
      await fc.assert(fc.asyncProperty(family.arbitrary, async (x) => { await family.check(x); }), { seed: SEED, numRuns: runs, endOnFailure: true });
    }, 120_000);
  }
});
