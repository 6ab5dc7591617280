// Every command that takes a result accepts a weave cell result (contacts with copies of the cell's rings in
// other cells) and a block of cells (--repeats). Checks: the figures the report shows are the cell's own
// (rings per area = cell rings / |a1 x a2|, elementary lattice geometry); tracks never pair a ring with
// itself; play on a block sees the block's own copies (no overlap); European 4-in-1 locks at its optimum
// (the weave is held by its neighbours at the minimum aspect ratio: common practice, no source).
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { main } from '../cli/main.js';
import { progressLines } from '../cli/play.js';
import { captureIo, tempDir } from './fabricateFixtures.js';

describe('weave results downstream', () => {
  const dir = tempDir('weave-down');
  const cell = join(dir, 'euro.json');
  const block = join(dir, 'euro2.json');
  beforeAll(async () => {
    expect(await main(['inflate', 'weave:euro-4-in-1', '--starts', '1', '--workers', '1', '-o', cell], captureIo())).toBe(0);
    expect(await main(['inflate', 'weave:euro-4-in-1', '--starts', '1', '--workers', '1', '--repeats', '2', '-o', block], captureIo())).toBe(0);
  }, 180_000);

  it('report shows the lattice, rings per area and the minimum aspect ratio', async () => {
    const html = join(dir, 'e.html');
    expect(await main(['report', cell, '-o', html], captureIo())).toBe(0);
    const page = readFileSync(html, 'utf8');
    const r = JSON.parse(readFileSync(cell, 'utf8')) as { aspectRatio: number; lattice: { vectors: number[][] }; periodic: { cellRings: number } };
    const [a, b] = r.lattice.vectors as [number[], number[]];
    const cross = [a[1]! * b[2]! - a[2]! * b[1]!, a[2]! * b[0]! - a[0]! * b[2]!, a[0]! * b[1]! - a[1]! * b[0]!];
    const perArea = r.periodic.cellRings / Math.hypot(cross[0]!, cross[1]!, cross[2]!);
    expect(page).toMatch(/lattice vector 1 \(of one cell\)/);
    expect(page).toContain('minimum aspect ratio of the weave');
    const shown = /rings per area<\/th>\s*<td[^>]*>([\d.]+)<\/td>/.exec(page);
    expect(shown).not.toBeNull();
    expect(Number(shown![1])).toBeCloseTo(perArea, 3);
    const ar = /minimum aspect ratio of the weave<\/th>\s*<td[^>]*>([\d.]+)<\/td>/.exec(page);
    expect(Number(ar![1])).toBeCloseTo(r.aspectRatio, 3);
  });

  it('tracks of a weave cell run on a block of cells and never pair a ring with itself', async () => {
    const out = join(dir, 't.json');
    const io = captureIo();
    expect(await main(['tracks', cell, '-o', out], io)).toBe(0);
    expect(io.stderr.join('\n')).toMatch(/expanded into a block of 3 cells per lattice direction/);
    const t = JSON.parse(readFileSync(out, 'utf8')) as { rings: { index: number; name: string; neighbours: { index: number; contacts: unknown[] }[] }[] };
    // Hand count: 2 rings per European 4-in-1 cell (the cell the catalogue writes) x 3 x 3 cells = 18.
    expect(t.rings.length).toBe(18);
    let touching = 0;
    for (const r of t.rings) for (const n of r.neighbours) {
      expect(n.index).not.toBe(r.index);
      if (n.contacts.length > 0) touching++;
    }
    expect(touching).toBeGreaterThan(0);
  });

  it('play on the cell and on a block of cells: no overlap error, locked', async () => {
    for (const path of [cell, block]) {
      const io = captureIo();
      expect(await main(['play', path, '--json'], io)).toBe(0);
      const p = JSON.parse(io.stdout.join('')) as { locked: boolean; mobility: { activeContacts: number } };
      // Locked at the optimum: common practice, no source (see header).
      expect(p.mobility.activeContacts).toBeGreaterThan(0);
      expect(p.locked).toBe(true);
    }
  }, 120_000);

  it('notes name rings that exist in that weave, and any document the text cites exists', async () => {
    const io = captureIo();
    const out = join(dir, 'box.json');
    expect(await main(['inflate', 'weave:box', '--starts', '1', '--workers', '1', '-o', out], io)).toBe(0);
    const text = io.stdout.join('\n');
    const names = (JSON.parse(readFileSync(out, 'utf8')) as { rings: { name: string }[] }).rings.map((r) => r.name);
    for (const m of text.matchAll(/Contacts with (\w+)\[s\] touch the copy of ring (\w+)/g)) {
      expect(names).toContain(m[1]);
      expect(names).toContain(m[2]);
    }
    for (const m of text.matchAll(/\b(docs\/[\w.-]+\.md)\b/g)) expect(existsSync(new URL(`../${m[1]}`, import.meta.url)), m[1]).toBe(true);
    expect(text).toMatch(/docs\/references\.md/);
  }, 120_000);

  it('play progress: silent in the first second, then at most four lines a second', () => {
    const io = captureIo();
    let t = 0;
    const tick = progressLines(io, () => t);
    tick('a');
    t = 900; tick('b');
    expect(io.stderr.length).toBe(0);
    t = 1100; tick('c');
    t = 1200; tick('d');
    t = 1400; tick('e');
    expect(io.stderr).toEqual(['play: c (1.1 s)', 'play: e (1.4 s)']);
    // "Still running" ticks repeat the running stage at most once a second.
    t = 1900; tick(null);
    t = 2500; tick(null);
    expect(io.stderr).toEqual(['play: c (1.1 s)', 'play: e (1.4 s)', 'play: e (2.5 s)']);
  });
});
