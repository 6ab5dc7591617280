// A failed run leaves a file already at the output path byte for byte as it was and writes nothing new,
// for every command that writes (the contract in the design notes; common practice, no source).
// inflate and compare: the solver's own result is kept but its status forced to 'failed' (a mocked
// multistart / compare, test-only), which is what a solve that cannot be verified reports. fabricate,
// tracks and report: genuine failures (a second output that cannot be written, bad input).
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it, vi } from 'vitest';
import { run } from './cliHarness.js';
import { tightHopf } from './fabricateFixtures.js';

vi.mock('../src/optimize/run/multistart.js', async (importOriginal) => {
  const orig = await importOriginal<typeof import('../src/optimize/run/multistart.js')>();
  return {
    ...orig,
    runMultistart: async (...args: Parameters<typeof orig.runMultistart>) => ({ ...(await orig.runMultistart(...args)), status: 'failed' as const }),
  };
});
vi.mock('../src/analyze/compare.js', async (importOriginal) => {
  const orig = await importOriginal<typeof import('../src/analyze/compare.js')>();
  return {
    ...orig,
    compare: async (...args: Parameters<typeof orig.compare>) => ({ ...(await orig.compare(...args)), status: 'failed' as const }),
  };
});

const dir = mkdtempSync(join(tmpdir(), 'thickring-dataloss-'));
const OLD = 'an earlier result the user wants to keep\n';

function existing(name: string): string {
  const p = join(dir, name);
  writeFileSync(p, OLD);
  return p;
}

/** No temporary file left in the folder either. */
function noLeftovers(): void {
  expect(readdirSync(dir).filter((f) => f.startsWith('.thickring-tmp-'))).toEqual([]);
}

describe('a failed run keeps the existing output file', () => {
  it('compare that fails (exit 1) leaves -o untouched (was: overwritten)', async () => {
    const out = existing('compare.json');
    const { code } = await run(['compare', 'hopf', '--starts', '1', '--workers', '1', '--sweep-points', '0', '-o', out]);
    expect(code).toBe(1);
    expect(readFileSync(out, 'utf8')).toBe(OLD);
    noLeftovers();
  });

  it('inflate that fails (exit 1) leaves -o untouched and writes no new file', async () => {
    const out = existing('inflate.json');
    expect((await run(['inflate', 'hopf', '--starts', '1', '--workers', '1', '-o', out])).code).toBe(1);
    expect(readFileSync(out, 'utf8')).toBe(OLD);
    const fresh = join(dir, 'never.json');
    expect((await run(['inflate', 'hopf', '--starts', '1', '--workers', '1', '-o', fresh])).code).toBe(1);
    expect(existsSync(fresh)).toBe(false);
    noLeftovers();
  });

  it('fabricate --stl --obj where the OBJ cannot be written: the existing STL is not replaced either', async () => {
    const result = join(dir, 'hopf.json');
    writeFileSync(result, JSON.stringify(tightHopf()));
    const stl = existing('part.stl');
    const objDir = join(dir, 'part.obj');
    mkdirSync(objDir); // a folder where the OBJ file should go: the rename fails
    const { code, io } = await run(['fabricate', result, '--core-radius', '10', '--process', 'fdm', '--chord', '0.05', '--stl', stl, '--obj', objDir]);
    expect(code).toBe(2);
    expect(io.stderr.join('\n')).toMatch(/part\.obj' cannot be written/);
    expect(readFileSync(stl, 'utf8')).toBe(OLD);
    noLeftovers();
  });

  it('tracks and report on a bad result file leave their outputs untouched', async () => {
    const bad = join(dir, 'bad.json');
    writeFileSync(bad, JSON.stringify({ ...tightHopf(), status: 'great' }));
    const tracks = existing('tracks.json');
    expect((await run(['tracks', bad, '-o', tracks])).code).toBe(2);
    expect(readFileSync(tracks, 'utf8')).toBe(OLD);
    const html = existing('report.html');
    expect((await run(['report', bad, '-o', html])).code).toBe(2);
    expect(readFileSync(html, 'utf8')).toBe(OLD);
    noLeftovers();
  });
});
