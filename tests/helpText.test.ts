// --help of the commands that hand results on (fabricate, tracks, play, report): every description is a
// sentence (capital letter, full stop) and defaults are values, never quoted strings (house style of this
// project's command line; common practice, no source).
import { describe, expect, it } from 'vitest';
import { main } from '../cli/main.js';
import { captureIo } from './fabricateFixtures.js';

describe.each(['fabricate', 'tracks', 'play', 'report'])('%s --help', (command) => {
  it('describes the command and each option in sentences, defaults as values', async () => {
    const io = captureIo();
    expect(await main([command, '--help'], io)).toBe(0);
    const text = io.stdout.join('');
    expect(text).not.toMatch(/default: "/);
    const lines = text.split('\n');
    const start = lines.findIndex((l) => /^(Options|Arguments):/.test(l));
    // Option and argument rows: name column, two or more spaces, then the description; commander wraps long
    // descriptions onto lines indented to the description column.
    const rows: string[] = [];
    for (const l of lines.slice(start)) {
      if (/^\s{2}\S.*\s{2,}\S/.test(l)) rows.push(l.trim().split(/\s{2,}/).slice(1).join(' '));
      else if (/^\s{6,}\S/.test(l) && rows.length > 0) rows[rows.length - 1] += ' ' + l.trim();
    }
    const descs = rows.filter((d) => !/^display help/.test(d));
    expect(descs.length).toBeGreaterThan(0);
    for (const desc of descs) {
      const row = desc;
      expect(desc, row).toMatch(/^[A-Z]/);
      expect(desc, row).toMatch(/[.)]$/);
    }
  });
});
