// The HTML report in a real browser (Debian chromium driven by playwright-core): it must open from
// file:// with every network request blocked, draw every plot (2D SVG and 3D WebGL) without a console
// or page error, and show ring names as text even when they contain markup.
// Outside reference: the browser itself (Debian chromium), as named in docs/references.md.
import { mkdirSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BrowserContext } from 'playwright-core';
import { launchChromium, type Browser } from './launch.js';
import { buildReportHtml } from '../../reports/html.js';
import { loadPlotlySource } from '../../reports/plotlySource.js';
import { analyzePlay } from '../../src/analyze/play.js';
import { playView } from '../../reports/playView.js';
import { hopfResult, torus3Compare } from '../reportFixture.js';

const ARTIFACTS = resolve('test-artifacts');

describe('HTML report in chromium', () => {
  let context: BrowserContext;
  let browser: Browser | undefined;

  beforeAll(async () => {
    mkdirSync(ARTIFACTS, { recursive: true });
    browser = await launchChromium({ width: 1280, height: 900 });
    context = browser.context;
  });

  afterAll(async () => {
    await browser?.close();
  });

  const cases = [
    { name: 'compare result (torus:3, hand-built)', file: 'report.html', shot: 'report.png', result: () => torus3Compare(), plots: 5, play: false },
    { name: 'inflate result with play (hopf, hand-built)', file: 'report-hopf.html', shot: 'report-hopf.png', result: () => hopfResult(), plots: 3, play: true },
  ];

  for (const c of cases) {
    it(`opens offline and renders every plot: ${c.name}`, async () => {
      const result = c.result();
      const play = c.play ? playView(await analyzePlay(result)) : null;
      const built = buildReportHtml(result, { plotlySource: loadPlotlySource(), sourceName: 'fixture.json', play });
      expect(built.plots).toHaveLength(c.plots);
      const path = join(ARTIFACTS, c.file);
      writeFileSync(path, built.html);

      const page = await context.newPage();
      const attempted: string[] = [];
      const problems: string[] = [];
      // Block everything that is not the file itself (or in-page data/blob URLs) and remember it.
      await page.route('**/*', (route) => {
        const url = route.request().url();
        if (/^(file|data|blob):/.test(url)) return route.continue();
        attempted.push(url);
        return route.abort();
      });
      page.on('request', (r) => { if (!/^(file|data|blob):/.test(r.url())) attempted.push(r.url()); });
      page.on('console', (m) => { if (m.type() === 'error') problems.push(`console: ${m.text()}`); });
      page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
      page.on('dialog', (d) => { problems.push(`dialog: ${d.message()}`); void d.dismiss(); });

      // Parsing 5 MB of inline script on a busy two-core machine can take a while: wait on the page's own signal.
      await page.goto(pathToFileURL(path).href, { waitUntil: 'commit' });
      await page.waitForSelector('body[data-plots]', { timeout: 280_000 });
      expect(await page.getAttribute('body', 'data-plots')).toBe('rendered');

      for (const id of built.plots) {
        const drawn = await page.evaluate((pid) => {
          const el = document.getElementById(pid);
          return !!el && (el.querySelector('.main-svg') !== null || el.querySelector('canvas') !== null);
        }, id);
        expect(drawn, `plot ${id} rendered`).toBe(true);
      }
      // 3D views must have a WebGL canvas, not plotly's "WebGL not supported" notice.
      const glCanvases = await page.evaluate(() =>
        Array.from(document.querySelectorAll('.gl-container canvas')).filter((cv) => (cv as HTMLCanvasElement).width > 0).length);
      expect(glCanvases).toBeGreaterThan(0);

      // Markup in a ring name stays text: no injected element ran.
      expect(await page.evaluate(() => (window as unknown as { __pwned?: number }).__pwned)).toBeUndefined();
      expect(await page.locator('img[src="x"]').count()).toBe(0);

      await page.waitForTimeout(500);
      await page.screenshot({ path: join(ARTIFACTS, c.shot), fullPage: true });
      await page.close();
      expect(attempted).toEqual([]);
      expect(problems).toEqual([]);
    }, 300_000);
  }
});
