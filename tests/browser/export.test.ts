// `thickring ui --export DIR` opened straight from disk (file://) in a real browser (Debian chromium driven by
// playwright-core): the page loads, opens hopf, inflates it in its Web Workers and reads tube / core = 1/2, with
// no console error and no request that leaves file: (nor blob:/data: made by the page itself).
// Outside references: the browser itself (Debian chromium, docs/references.md); the tight Hopf link has
// tube / core = 1/2 (Cantarella, Kusner, Sullivan, "On the minimum ropelength of knots and links",
// Invent. Math. 150 (2002)).
import { existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchChromium, type Browser } from './launch.js';
import { main } from '../../cli/main.js';
import type { Io } from '../../cli/io.js';

/** Relative agreement asked of the page's tube / core with 1/2: the solve's default tolerance is 1e-9. */
const HOPF_REL_TOL = 1e-6;

describe('thickring ui --export, opened from disk', () => {
  let browser: Browser | undefined;
  let dir: string;

  beforeAll(async () => {
    if (!existsSync(resolve('dist/ui/index.html'))) throw new Error('dist/ui is missing: run npm run build first');
    dir = mkdtempSync(join(tmpdir(), 'thickring-ui-export-'));
    browser = await launchChromium({ width: 1280, height: 800 });
  });

  afterAll(async () => {
    await browser?.close();
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('writes static files that open hopf and inflate it to tube/core 0.5 from file://', async () => {
    const out: string[] = [];
    const io: Io = { out: (t) => out.push(t), err: () => {}, interactive: false };
    const page = join(dir, 'page');
    expect(await main(['ui', 'hopf', '--export', page, '--json'], io)).toBe(0);
    const written = JSON.parse(out.join('')) as { export: string; files: number };
    expect(written.files).toBe(readdirSync(page, { recursive: true, withFileTypes: true }).filter((f) => f.isFile()).length);
    expect(existsSync(join(page, 'index.html'))).toBe(true);

    const tab = await browser!.context.newPage();
    const attempted: string[] = [];
    const problems: string[] = [];
    // Every request the page and its workers make must stay on disk (or be a blob:/data: the page made).
    await browser!.context.route('**/*', (route) => {
      const u = route.request().url();
      if (/^(file|data|blob):/.test(u)) return route.continue();
      attempted.push(u);
      return route.abort();
    });
    browser!.context.on('request', (r) => { if (!/^(file|data|blob):/.test(r.url())) attempted.push(r.url()); });
    tab.on('console', (m) => { if (m.type() === 'error') problems.push(`console: ${m.text()}`); });
    tab.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
    tab.on('requestfailed', (r) => problems.push(`request failed: ${r.url()} (${r.failure()?.errorText ?? ''})`));

    await tab.goto(pathToFileURL(join(page, 'index.html')).href);
    await tab.waitForSelector('body[data-ready]', { state: 'attached', timeout: 60_000 });
    expect(await tab.getAttribute('body', 'data-loaded')).toBe('hopf');

    await tab.click('#inflate');
    const ratioCell = tab.locator('#result [data-key="tube-over-core"]');
    await ratioCell.waitFor({ timeout: 180_000 });
    const ratioText = (await ratioCell.textContent()) ?? '';
    expect(ratioText).toContain('(dimensionless)');
    const ratio = Number(/^([\d.eE+-]+)/.exec(ratioText)?.[1]);
    expect(Math.abs(ratio - 0.5) / 0.5).toBeLessThan(HOPF_REL_TOL);
    expect(await tab.textContent('#result [data-key="status"]')).toMatch(/^optimal/);

    await tab.close();
    expect(attempted).toEqual([]);
    expect(problems).toEqual([]);
  }, 240_000);
});
