// `thickring report`: bad input is refused with a clear message, exit 2 and nothing written; a good
// result file (hand-built, so no solver is involved) gives one self-contained HTML file.
// The hand-built tight Hopf result is the configuration of Cantarella, Kusner, Sullivan, Invent. Math. 150
// (2002): two round rings, each through the other's centre, tube R/2.
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { main } from '../cli/main.js';
import type { Io } from '../cli/io.js';
import { hopfResult, torus3Compare } from './reportFixture.js';

const dir = mkdtempSync(join(tmpdir(), 'thickring-report-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function capture(): Io & { stdout: string[]; stderr: string[] } {
  const stdout: string[] = [], stderr: string[] = [];
  return { stdout, stderr, interactive: false, out: (t) => stdout.push(t), err: (t) => stderr.push(t) };
}

async function run(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  const io = capture();
  const code = await main(args, io);
  return { code, stdout: io.stdout.join(''), stderr: io.stderr.join('') };
}

function file(name: string, content: unknown): string {
  const p = join(dir, name);
  writeFileSync(p, typeof content === 'string' ? content : JSON.stringify(content));
  return p;
}

describe('thickring report: bad input', () => {
  const cases: [string, () => string, RegExp][] = [
    ['a missing file', () => join(dir, 'nope.json'), /cannot be read/],
    ['a file that is not JSON', () => file('text.json', 'tube = 0.5'), /not valid JSON/],
    ['a layout file (another format)', () => file('layout.json', {
      format: 'thickring-layout/1', rings: [{ name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 1 }],
    }), /format "thickring-layout\/1"|expected format "thickring-result\/1"/],
    ['another format version', () => file('v2.json', { ...hopfResult(), format: 'thickring-result/2' }), /format version 'thickring-result\/2'/],
    ['a file from another tool', () => file('pkg.json', { name: 'something', version: '1.0.0' }), /no 'format' field/],
    ['a compare result without its symmetric optimum', () => {
      const { symmetric: _s, ...rest } = torus3Compare();
      return file('half.json', rest);
    }, /needs both "symmetric" and "broken"/],
  ];
  for (const [what, make, message] of cases) {
    it(`refuses ${what}: exit 2, message on stderr, nothing written`, async () => {
      const out = join(dir, `out-${what.replace(/\W+/g, '-')}.html`);
      const r = await run(['report', make(), '-o', out]);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(message);
      expect(r.stdout).toBe('');
      expect(existsSync(out)).toBe(false);
    });
  }

  it('asks for -o when no output file is given', async () => {
    const r = await run(['report', file('ok.json', hopfResult())]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/-o/);
  });
});

describe('thickring report: a good result', () => {
  it('writes one HTML file with the plotting library inlined and prints one JSON object with --json', async () => {
    const input = file('compare.json', torus3Compare());
    const out = join(dir, 'compare.html');
    const r = await run(['report', input, '-o', out, '--no-play', '--json']);
    expect(r.code).toBe(0);
    const summary = JSON.parse(r.stdout);
    expect(summary).toMatchObject({ command: 'report', output: out, playSkipped: 'left out (--no-play)' });
    const html = readFileSync(out, 'utf8');
    expect(summary.bytes).toBe(Buffer.byteLength(html));
    // plotly.js identifies itself in its bundle header; the report carries it, not a link to it.
    expect(html).toMatch(/plotly\.js v\d+\.\d+\.\d+/);
    expect(html).not.toMatch(/<script[^>]*\ssrc=/i);
  });

  it('adds the play section for the tight Hopf link', async () => {
    const input = file('hopf.json', hopfResult());
    const out = join(dir, 'hopf.html');
    const r = await run(['report', input, '-o', out, '--json']);
    expect(r.code).toBe(0);
    const summary = JSON.parse(r.stdout);
    const html = readFileSync(out, 'utf8');
    expect(summary.playSkipped).toBeNull();
    expect(summary.sections).toContain('Play: locked or rattling?');
    expect(html).toMatch(/<span class="badge (ok|warn)">(locked|has play)<\/span>/);
  });
});
