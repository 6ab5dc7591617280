// Cautions printed with every fabricate run (text and JSON), for every process. The content follows
// common product-safety practice (common practice, no source): no load-bearing use, small parts and
// choking, skin contact rules for jewellery metals (e.g. nickel release), defer to local codes.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { main } from '../cli/main.js';
import { CAUTION_TEXT, CAUTIONS } from '../src/fabricate/cautions.js';
import { PROCESS_NAMES } from '../src/fabricate/presets.js';
import { captureIo, tempDir, threeChain, writeResult } from './fabricateFixtures.js';

describe('cautions', () => {
  it('cover load-bearing use, choking, skin contact and local codes', () => {
    expect(CAUTION_TEXT).toMatch(/not rated for lifting, climbing.*load-bearing or safety use/);
    expect(CAUTION_TEXT).toMatch(/choking hazard/);
    expect(CAUTION_TEXT).toMatch(/skin contact.*nickel release/);
    expect(CAUTION_TEXT).toMatch(/local codes.*licensed practice/);
    for (const c of CAUTIONS) expect(CAUTION_TEXT).toContain(c);
  });

  const dir = tempDir('cautions');
  const path = writeResult(dir, 'chain.json', threeChain());
  for (const process of PROCESS_NAMES) {
    it(`are printed with every ${process} run, in text and in JSON`, async () => {
      const text = captureIo();
      expect(await main(['fabricate', path, '--outer-diameter', '40', '--process', process], text)).toBe(0);
      const printed = [...text.stdout, ...text.stderr].join('\n');
      for (const c of CAUTIONS) expect(printed).toContain(c);
      const json = captureIo();
      expect(await main(['fabricate', path, '--outer-diameter', '40', '--process', process, '--json'], json)).toBe(0);
      expect(json.stdout.length).toBe(1);
      expect((JSON.parse(json.stdout[0]!) as { cautions: string[] }).cautions).toEqual([...CAUTIONS]);
    });
  }

  it('one list under one word, "Cautions", in inflate, compare, play, fabricate and the report', async () => {
    const dir2 = tempDir('cautions-all');
    const res = join(dir2, 'hopf.json');
    const inflate = captureIo();
    expect(await main(['inflate', 'hopf', '--starts', '1', '--workers', '1', '-o', res], inflate)).toBe(0);
    const compare = captureIo();
    expect(await main(['compare', 'hopf', '--starts', '1', '--workers', '1'], compare)).toBe(0);
    const play = captureIo();
    expect(await main(['play', res], play)).toBe(0);
    const html = join(dir2, 'r.html');
    expect(await main(['report', res, '-o', html], captureIo())).toBe(0);
    const page = readFileSync(html, 'utf8');
    for (const out of [inflate.stdout.join('\n'), compare.stdout.join('\n'), play.stdout.join('\n')]) {
      expect(out).toContain(CAUTION_TEXT);
      expect(out).not.toMatch(/CAUTIONS|Caution:/);
    }
    expect(page).toContain('>Cautions<');
    // The report escapes its text for HTML.
    for (const c of CAUTIONS) expect(page).toContain(c.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;'));
  }, 120_000);

  it('are printed even when the design draws a warning', async () => {
    const io = captureIo();
    expect(await main(['fabricate', path, '--outer-diameter', '3', '--process', 'sls', '--allow-thin'], io)).toBe(0);
    const printed = io.stdout.join('\n');
    expect(printed).toMatch(/WARNING/);
    for (const c of CAUTIONS) expect(printed).toContain(c);
  });
});
