// No floating-point noise in text or report: a coordinate of 8.9e-17 beside 0.5 is a rounding residue of a
// symmetric construction (double precision, about 1.1e-16 relative: IEEE 754), shown as 0; angles to 0.1 degree.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { main } from '../cli/main.js';
import { vec } from '../reports/format.js';
import { captureIo, tempDir } from './fabricateFixtures.js';

describe('text without rounding noise', () => {
  it('vectors show residues below 1e-12 of their largest component as 0', () => {
    expect(vec([8.9e-17, 0.5, -1])).toBe('(0, 0.5, -1)');
    // A genuinely small component of a small vector stays.
    expect(vec([1e-9, 2e-9, 0])).toBe('(1e-9, 2e-9, 0)');
  });

  it('the report of a symmetric result has no exponent-noise figures in its tables, and play angles to 0.1 degree', async () => {
    const dir = tempDir('noise');
    const res = join(dir, 'p.json');
    expect(await main(['inflate', 'torus:3', '--symmetry', 'cyclic:3', '--starts', '1', '--workers', '1', '-o', res], captureIo())).toBe(0);
    const html = join(dir, 'p.html');
    expect(await main(['report', res, '-o', html], captureIo())).toBe(0);
    const page = readFileSync(html, 'utf8');
    // Positions and normals (the vectors of the rings and contacts tables); residuals such as 1e-15 are figures.
    const cells = [...page.matchAll(/<td class="n">(\([^<]*)<\/td>/g)].map((m) => m[1]!);
    expect(cells.length).toBeGreaterThan(0);
    for (const c of cells) expect(c, c).not.toMatch(/e-1[3-9]/);
    const tilts = [...page.matchAll(/tilt \(least[^<]*<\/th><td class="n">([^<]*)<\/td>/g)].flatMap((m) => m[1]!.split(' … '));
    expect(tilts.length).toBeGreaterThan(0);
    for (const t of tilts) expect(t).toMatch(/^(&gt; )?-?\d+\.\d$/);
  }, 120_000);
});
