// Many rings through the command line: the catalogue takes chains and necklaces up to 256 rings and refuses
// more with exit 2 naming the field and the limit; a solve stopped by --time-limit says so, keeps a tube the
// independent checker (src/check/verify.ts) accepts, and gives its gap to the packing bound (k = 2 rings through
// a chain ring: tube <= R/3, Graham, Lubachevsky, Nurmela, Östergård, Discrete Math. 181, 1998).
import { describe, expect, it } from 'vitest';
import { run } from './cliHarness.js';
import { verifyRings } from '../src/check/verify.js';
import { catalogLayout } from '../src/model/catalog.js';
import type { SolveResult } from '../src/model/result.js';
import { linkingMatrix } from '../src/topology/index.js';

describe('catalogue limits', () => {
  it('chain:256 and necklace:256 are generated linked as named; chain:257, necklace:300, star:65 are refused (exit 2, one line naming spec and limit)', async () => {
    for (const spec of ['chain:256', 'necklace:256']) {
      const rings = catalogLayout(spec).rings;
      expect(rings).toHaveLength(256);
      const L = linkingMatrix(rings);
      // A chain links consecutive rings only; a necklace also closes the loop (the spec's definition).
      for (let i = 0; i < 256; i++) {
        for (let j = i + 1; j < 256; j++) {
          const linked = j === i + 1 || (spec.startsWith('necklace') && i === 0 && j === 255);
          expect(Math.abs(L[i]![j]!)).toBe(linked ? 1 : 0);
        }
      }
    }
    for (const [spec, limit] of [['chain:257', 256], ['necklace:300', 256], ['star:65', 64]] as const) {
      const { code, io } = await run(['inflate', spec]);
      expect(code).toBe(2);
      expect(io.stderr).toHaveLength(1);
      expect(io.stderr[0]).toContain(`spec '${spec}'`);
      expect(io.stderr[0]).toContain(`to ${limit}`);
      expect(io.stderr[0]!.split('\n')).toHaveLength(1);
    }
  });
});

describe('weave blocks', () => {
  it('a 2-in-1 block of 100 cells (200 rings) is re-checked as a whole; a 40 x 40 sheet block is refused naming --repeats and the limit', async () => {
    const { code, io } = await run(['inflate', 'weave:2-in-1', '--json', '--starts', '1', '--workers', '1', '--repeats', '100']);
    expect(code).toBe(0);
    const r = JSON.parse(io.stdout[0]!) as SolveResult;
    expect(r.rings).toHaveLength(200);
    expect(r.verification.ok).toBe(true);
    // 2-in-1 minimum aspect ratio 2 (packing bound k = 2, Graham et al. 1998; docs/weaves.md).
    expect(Math.abs(r.aspectRatio - 2)).toBeLessThan(1e-8);
    const big = await run(['inflate', 'weave:euro-4-in-1', '--starts', '1', '--workers', '1', '--repeats', '40']);
    expect(big.code).toBe(2);
    expect(big.io.stderr.join('\n')).toMatch(/--repeats: 40 cells per direction make \d+ rings, above the limit of 1024 rings per block; use --repeats \d+ or fewer/);
  });
});

describe('--time-limit', () => {
  it('a chain stopped after 0.5 s is stalled with stopReason "time limit", checked, and carries its gap to the bound', async () => {
    const { code, io } = await run(['inflate', 'chain:24', '--json', '--starts', '1', '--workers', '1', '--time-limit', '0.5']);
    expect(code).toBe(0);
    const r = JSON.parse(io.stdout[0]!) as SolveResult;
    expect(r.status).toBe('stalled');
    expect(r.stopReason).toBe('time limit');
    expect(r.starts[0]!.stopReason).toBe('time limit');
    expect(r.verification.ok).toBe(true);
    expect(verifyRings(r.rings, r.tube, r.linking).ok).toBe(true);
    expect(r.bound!.tube).toBeCloseTo(1 / 3, 12);
    // Bound R/3 for R = 1 from the packing bound k = 2 (header); the gap is the relative shortfall by its
    // definition (internal consistency, no outside source).
    expect(r.bound!.gap).toBeCloseTo((1 / 3 - r.tube) / (1 / 3), 12);
    expect(r.bound!.gap).toBeGreaterThan(0);
  });

  it('text output names the stop and the gap; bad values are refused naming --time-limit', async () => {
    const { code, io } = await run(['inflate', 'chain:24', '--starts', '1', '--workers', '1', '--time-limit', '0.5']);
    expect(code).toBe(0);
    expect(io.stdout.join('\n')).toMatch(/Stopped short: time limit; the tube above is the checked one, \S+ \(dimensionless\) below the packing bound/);
    for (const bad of ['0', '-3', 'soon', '1e9']) {
      const r = await run(['inflate', 'hopf', '--time-limit', bad]);
      expect(r.code).toBe(2);
      expect(r.io.stderr.join('\n')).toMatch(/--time-limit: '.*' must be a number of seconds > 0/);
    }
  });
});
