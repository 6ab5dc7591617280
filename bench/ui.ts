// Page-load benchmark in Debian chromium (playwright-core), software WebGL as in the browser tests:
// time to first render and to interactive for the `thickring ui` page (served, and exported and opened from
// disk) and for the HTML report of the README's pendant (torus:3 with cyclic:3 imposed), the former report
// (plotting library run inline, every plot drawn while loading) beside the current one (library started
// lazily, plots on screen first).
// Seeded solve; one warm-up load per page; median of repeats; old and new measured in the same run.
// Figures per load (milliseconds from navigation start):
//   first render  = first contentful paint;
//   interactive   = end of the main-thread task that covers DOMContentLoaded (the first moment a click is
//                   handled: the page is parsed, its scripts ran and no long task holds the thread);
//   longest task  = the longest main-thread task after that in the first `WINDOW_MS` (worst input delay);
//   plots drawn   = report only: every plot drawn (body[data-plots]), ui: page wired (body[data-ready]).
// Target: the report interactive within 3 s. Screenshots go to test-artifacts/.
// Run: npm run build && node dist/bench/ui.js [--repeats N] [--json]
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium, type BrowserContext } from 'playwright-core';
import { exportPage, startUiServer } from '../cli/uiServer.js';
import { buildReportHtml } from '../reports/html.js';
import { loadPlotlySource, loadViewSource } from '../reports/plotlySource.js';
import { playView } from '../reports/playView.js';
import { analyzePlay } from '../src/analyze/play.js';
import { resolveSpec } from '../src/model/spec.js';
import { parseSymmetryOption } from '../src/model/symmetry.js';
import { runMultistart } from '../src/optimize/run/multistart.js';
import { benchArgs, median } from './stats.js';

const SEED = 20261201;
const TARGET_MS = 3000;
const WINDOW_MS = 15_000;
const { repeats: REPEATS, json } = benchArgs(process.argv.slice(2), 3);
const ARTIFACTS = resolve('test-artifacts');

interface Load { firstRender: number; interactive: number; longestTask: number; done: number }

const INIT = `
  window.__tr = { tasks: [], done: null };
  try { new PerformanceObserver(function (l) { l.getEntries().forEach(function (e) { window.__tr.tasks.push([e.startTime, e.duration]); }); })
    .observe({ type: 'longtask', buffered: true }); } catch (e) {}
  new MutationObserver(function () {
    var b = document.body;
    if (b && window.__tr.done === null && (b.hasAttribute('data-plots') || b.hasAttribute('data-ready'))) window.__tr.done = performance.now();
  }).observe(document, { attributes: true, subtree: true, attributeFilter: ['data-plots', 'data-ready'] });
`;

async function measure(context: BrowserContext, url: string, shot: string | null): Promise<Load> {
  const page = await context.newPage();
  await page.addInitScript(INIT);
  await page.goto(url, { waitUntil: 'commit' });
  await page.waitForFunction(() => (window as unknown as { __tr?: { done: number | null } }).__tr?.done !== null, undefined, { timeout: 180_000, polling: 250 });
  // Let late tasks (idle-time plots) land inside the window before reading the figures.
  await page.waitForTimeout(1500);
  const raw = await page.evaluate(() => {
    const tr = (window as unknown as { __tr: { tasks: [number, number][]; done: number } }).__tr;
    const nav = performance.getEntriesByType('navigation')[0] as PerformanceNavigationTiming;
    const fcp = performance.getEntriesByType('paint').find((p) => p.name === 'first-contentful-paint');
    return { tasks: tr.tasks, done: tr.done, dcl: nav.domContentLoadedEventEnd, fcp: fcp ? fcp.startTime : NaN };
  });
  if (shot) await page.screenshot({ path: join(ARTIFACTS, shot) });
  await page.close();
  let interactive = raw.dcl;
  for (const [s, d] of raw.tasks) if (s <= interactive && s + d >= interactive) interactive = s + d;
  let longest = 0;
  for (const [s, d] of raw.tasks) if (s >= interactive && s < WINDOW_MS) longest = Math.max(longest, d);
  return { firstRender: raw.fcp, interactive, longestTask: longest, done: raw.done };
}

async function main(): Promise<void> {
  mkdirSync(ARTIFACTS, { recursive: true });
  // The README's pendant, solved here (seeded) with its play section, as `thickring report` builds it.
  const r = resolveSpec('torus:3');
  const result = await runMultistart(
    { rings: r.layout.rings, tubeRatios: r.layout.rings.map(() => 1), linking: r.linking, symmetry: parseSymmetryOption('cyclic:3', 3) },
    { starts: 2, workers: 2, seed: SEED, tol: 1e-9, spec: 'torus:3', command: 'inflate', units: null },
  );
  const play = playView(await analyzePlay(result));
  const plotlySource = loadPlotlySource();
  const dir = mkdtempSync(join(tmpdir(), 'thickring-bench-ui-'));
  const oldPath = join(dir, 'pendant-old.html');
  const newPath = join(dir, 'pendant-new.html');
  writeFileSync(oldPath, buildReportHtml(result, { plotlySource, play, sourceName: 'pendant.json', eagerPlots: true }).html);
  writeFileSync(newPath, buildReportHtml(result, { plotlySource, viewSource: loadViewSource(), play, sourceName: 'pendant.json' }).html);
  const server = await startUiServer({ host: '127.0.0.1', port: 0, preload: { kind: 'spec', spec: 'torus:3' } });
  const exported = join(dir, 'ui-export');
  exportPage(exported, { kind: 'spec', spec: 'torus:3' });
  const profile = mkdtempSync(join(tmpdir(), 'thickring-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: '/usr/bin/chromium', headless: true, viewport: { width: 1280, height: 800 },
    args: ['--headless', '--no-sandbox', '--disable-background-networking', '--no-first-run',
      '--use-angle=swiftshader', '--enable-unsafe-swiftshader', '--disable-component-update', '--disable-sync'],
  });
  const pages = [
    { name: 'report, old (inline plotting, all plots at load)', url: pathToFileURL(oldPath).href, shot: 'bench-report-old.png' },
    { name: 'report, new (lazy plotting, three.js 3D view)', url: pathToFileURL(newPath).href, shot: 'bench-report-new.png' },
    { name: 'thickring ui page (torus:3)', url: server.url, shot: 'bench-ui.png' },
    { name: 'thickring ui --export, from disk (torus:3)', url: pathToFileURL(join(exported, 'index.html')).href, shot: null },
  ];
  const rows: Record<string, unknown>[] = [];
  try {
    for (const p of pages) {
      await measure(context, p.url, null); // warm-up
      const loads: Load[] = [];
      for (let k = 0; k < REPEATS; k++) loads.push(await measure(context, p.url, k === 0 ? p.shot : null));
      rows.push({
        page: p.name,
        firstRenderMs: Math.round(median(loads.map((l) => l.firstRender))),
        interactiveMs: Math.round(median(loads.map((l) => l.interactive))),
        longestTaskAfterMs: Math.round(median(loads.map((l) => l.longestTask))),
        doneMs: Math.round(median(loads.map((l) => l.done))),
        repeats: REPEATS,
      });
      if (!json) {
        const row = rows[rows.length - 1]!;
        console.log(`${p.name}: first render ${row['firstRenderMs']} ms, interactive ${row['interactiveMs']} ms, ` +
          `longest task after ${row['longestTaskAfterMs']} ms, ${p.name.startsWith('report') ? 'all plots drawn' : 'page wired'} ${row['doneMs']} ms ` +
          `(median of ${REPEATS})`);
      }
    }
  } finally {
    await context.close();
    await server.close();
    rmSync(profile, { recursive: true, force: true });
    rmSync(dir, { recursive: true, force: true });
  }
  const newReport = rows[1]!['interactiveMs'] as number;
  if (json) console.log(JSON.stringify({ rows, targetMs: TARGET_MS, met: newReport <= TARGET_MS }));
  else console.log(`Target: report interactive within ${TARGET_MS} ms: ${newReport <= TARGET_MS ? 'met' : 'NOT met'} (${newReport} ms)`);
}

await main();
