// With --json every command prints exactly one JSON object on stdout, errors included:
// { "error": { "message", "field", "exitCode" } } with exit code 2 for bad input (the command-line contract of
// this project's design notes; the shape is the project's own, no outside source).
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { main } from '../cli/main.js';
import { captureIo, tempDir, threeChain, writeResult } from './fabricateFixtures.js';

const dir = tempDir('json-errors');
const good = writeResult(dir, 'chain.json', threeChain());
const missing = join(dir, 'nope.json');

const cases: [string, string[], RegExp][] = [
  ['catalog', ['catalog', '--bogus'], /unknown option/],
  ['measure', ['measure', missing], /nope\.json/],
  ['inflate', ['inflate', 'hopf', '--starts', '0'], /--starts/],
  ['compare', ['compare', 'hopf', '--starts', 'x'], /--starts/],
  ['report', ['report', missing, '-o', join(dir, 'r.html')], /nope\.json/],
  ['fabricate', ['fabricate', good, '--wire', '16xyz'], /--wire '16xyz'/],
  ['tracks', ['tracks', good], /-o\/--output FILE is required/],
  ['play', ['play', good, '--tube', '-1'], /--tube/],
];

describe.each(cases)('%s --json with bad input', (_name, args, message) => {
  it('prints one error object on stdout and exits 2', async () => {
    const io = captureIo();
    const code = await main([...args, '--json'], io);
    expect(code).toBe(2);
    expect(io.stdout.length).toBe(1);
    const o = JSON.parse(io.stdout[0]!) as { error: { message: string; field: string | null; exitCode: number } };
    expect(Object.keys(o)).toEqual(['error']);
    expect(o.error.exitCode).toBe(2);
    expect(o.error.message).toMatch(message);
    expect('field' in o.error).toBe(true);
  });
});

describe('fields', () => {
  it('names the option the message is about', async () => {
    const io = captureIo();
    expect(await main(['fabricate', good, '--wire', '16xyz', '--json'], io)).toBe(2);
    expect((JSON.parse(io.stdout[0]!) as { error: { field: string } }).error.field).toBe('--wire');
  });
});
