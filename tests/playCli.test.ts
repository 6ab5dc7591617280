// `thickring play` through cli/main with a capturing Io (no process spawned): the JSON contract, the text
// output's units and cautions, and exit code 2 for bad input.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { main } from '../cli/main.js';
import type { Io } from '../cli/io.js';
import { hopfRings, resultOf } from './playFixtures.js';

function capture(): Io & { stdout: () => string; stderr: () => string } {
  let out = '', err = '';
  return {
    out: (t) => { out += t.endsWith('\n') ? t : t + '\n'; },
    err: (t) => { err += t.endsWith('\n') ? t : t + '\n'; },
    interactive: false,
    stdout: () => out,
    stderr: () => err,
  };
}

const dir = mkdtempSync(join(tmpdir(), 'thickring-play-'));
const hopfFile = join(dir, 'hopf.json');
// Tight Hopf link, R = 1, tube 1/2 (Cantarella–Kusner–Sullivan 2002).
writeFileSync(hopfFile, JSON.stringify(resultOf(hopfRings(1), 0.5, 'hopf', 'mm')));

describe('thickring play', () => {
  it('prints exactly one JSON object with the contract keys', async () => {
    const io = capture();
    expect(await main(['play', hopfFile, '--json'], io)).toBe(0);
    const lines = io.stdout().trim().split('\n');
    expect(lines).toHaveLength(1);
    const report = JSON.parse(lines[0]!) as Record<string, unknown>;
    for (const key of ['locked', 'freeMotions', 'play', 'secondOrder', 'tube', 'rings', 'status', 'aspectRatio']) {
      expect(report).toHaveProperty(key);
    }
    expect(report['locked']).toBe(true);
    expect(report['tube']).toBe(0.5);
    expect(report['status']).toBe('optimal');
  });

  it('with --tube below R/2 reports a rattling pair, with units on every length', async () => {
    const json = capture();
    expect(await main(['play', hopfFile, '--tube', '0.3', '--json'], json)).toBe(0);
    expect((JSON.parse(json.stdout()) as { locked: boolean }).locked).toBe(false);
    const text = capture();
    expect(await main(['play', hopfFile, '--tube', '0.3'], text)).toBe(0);
    const out = text.stdout();
    expect(out).toContain('NOT LOCKED');
    expect(out).toContain('Tube analysed: 0.3 mm');
    expect(out).toContain('translations in mm, turns in degrees');
    expect(out).toContain('Cautions:');
  });

  it('exits with 2 on bad input, naming the value', async () => {
    for (const args of [['--tube', '-1'], ['--tube', 'thick'], ['--tube', '0.7'], ['--cap', '0']]) {
      const io = capture();
      expect(await main(['play', hopfFile, ...args, '--json'], io)).toBe(2);
      // --json: the error is one object on stdout, naming the option.
      const o = JSON.parse(io.stdout()) as { error: { message: string; exitCode: number } };
      expect(o.error.message).toContain(args[0]!);
      expect(o.error.exitCode).toBe(2);
    }
    const missing = capture();
    expect(await main(['play', join(dir, 'nope.json')], missing)).toBe(2);
    const wrong = join(dir, 'layout.json');
    writeFileSync(wrong, JSON.stringify({ format: 'thickring-layout/1', rings: [] }));
    const io = capture();
    expect(await main(['play', wrong], io)).toBe(2);
    expect(io.stderr()).toContain('format');
  });
});
