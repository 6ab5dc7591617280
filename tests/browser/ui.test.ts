// The `thickring ui` page in a real browser (Debian chromium driven by playwright-core), served by the real
// command on a free port: open hopf, inflate it in the page's Web Workers, download the STL, try a move that
// would pass one ring through the other, open malformed files; no console error, no request off 127.0.0.1.
// Outside references: the browser itself (Debian chromium, docs/references.md); the tight Hopf link has
// tube / core = 1/2 (Cantarella, Kusner, Sullivan, Invent. Math. 150 (2002)); the binary STL layout of an
// 80-byte header, a little-endian uint32 facet count and 50 bytes per facet (3D Systems, "SLC File Format
// Specification" / the StereoLithography interface spec, 1989).
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BrowserContext } from 'playwright-core';
import { launchChromium, type Browser } from './launch.js';
import { main } from '../../cli/main.js';
import type { Io } from '../../cli/io.js';
import { buildReportHtml } from '../../reports/html.js';
import { loadPlotlySource, loadViewSource } from '../../reports/plotlySource.js';
import { pathToFileURL } from 'node:url';
import { hopfResult } from '../reportFixture.js';
import { refMinima } from '../reference/bruteCircle.js';

interface RefRing { center: number[]; normal: number[]; radius: number }

const ARTIFACTS = resolve('test-artifacts');
/** Relative agreement asked of the page's tube / core with 1/2: the solve's default tolerance is 1e-9. */
const HOPF_REL_TOL = 1e-6;

/** Start `thickring ui` (from source, as the tests run it) and wait for the address it prints. */
async function startUi(args: string[]): Promise<{ child: ChildProcess; url: string }> {
  const cli = resolve('cli/main.ts');
  const script = `import(${JSON.stringify(cli)}).then(async (m) => { process.exitCode = await m.main(${JSON.stringify(['ui', ...args])}); });`;
  const child = spawn(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', script], { stdio: ['ignore', 'pipe', 'pipe'] });
  let out = '';
  let err = '';
  child.stdout!.on('data', (c: Buffer) => (out += c.toString()));
  child.stderr!.on('data', (c: Buffer) => (err += c.toString()));
  const url = await new Promise<string>((ok, fail) => {
    const t = setInterval(() => {
      const m = /http:\/\/127\.0\.0\.1:\d+\//.exec(out);
      if (m) { clearInterval(t); ok(m[0]); }
    }, 100);
    child.on('exit', (code) => { clearInterval(t); fail(new Error(`thickring ui exited with ${code}: ${err}`)); });
  });
  return { child, url };
}

describe('thickring ui in chromium', () => {
  let context: BrowserContext;
  let browser: Browser | undefined;
  let ui: { child: ChildProcess; url: string };
  let scratch: string;

  beforeAll(async () => {
    if (!existsSync(resolve('dist/ui/index.html'))) throw new Error('dist/ui is missing: run npm run build first');
    mkdirSync(ARTIFACTS, { recursive: true });
    scratch = mkdtempSync(join(tmpdir(), 'thickring-ui-files-'));
    ui = await startUi(['hopf']);
    browser = await launchChromium({ width: 1280, height: 800, acceptDownloads: true });
    context = browser.context;
  });

  afterAll(async () => {
    await browser?.close();
    if (ui?.child.exitCode === null) {
      await new Promise<void>((ok) => { ui.child.on('exit', () => ok()); ui.child.kill('SIGINT'); });
    }
    if (scratch) rmSync(scratch, { recursive: true, force: true });
  });

  it('opens hopf, inflates to tube/core 0.5, downloads an STL, refuses a pass-through, reports bad files', async () => {
    const page = await context.newPage();
    const origin = new URL(ui.url).origin;
    const offsite: string[] = [];
    const problems: string[] = [];
    const local = (u: string): boolean => u.startsWith(origin + '/') || /^(data|blob):/.test(u);
    // Block and remember every request that does not go to the local server (page and its workers).
    await context.route('**/*', (route) => {
      const u = route.request().url();
      if (local(u)) return route.continue();
      offsite.push(u);
      return route.abort();
    });
    context.on('request', (r) => { if (!local(r.url())) offsite.push(r.url()); });
    page.on('console', (m) => { if (m.type() === 'error') problems.push(`console: ${m.text()}`); });
    page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));

    await page.goto(ui.url);
    await page.waitForSelector('body[data-ready]', { state: 'attached', timeout: 60_000 });
    expect(await page.getAttribute('body', 'data-loaded')).toBe('hopf');

    // Inflate: the same solver, in Web Workers.
    await page.click('#inflate');
    const ratioCell = page.locator('#result [data-key="tube-over-core"]');
    await ratioCell.waitFor({ timeout: 180_000 });
    const ratioText = (await ratioCell.textContent()) ?? '';
    expect(ratioText).toContain('(dimensionless)');
    const ratio = Number(/^([\d.eE+-]+)/.exec(ratioText)?.[1]);
    expect(Math.abs(ratio - 0.5) / 0.5).toBeLessThan(HOPF_REL_TOL);
    expect(await page.textContent('#result [data-key="status"]')).toMatch(/^optimal/);
    await page.screenshot({ path: join(ARTIFACTS, 'ui.png') });

    // STL download: 80-byte header, uint32 facet count, 50 bytes per facet.
    const [download] = await Promise.all([page.waitForEvent('download'), page.click('#dl-stl')]);
    const stlPath = join(scratch, 'hopf.stl');
    await download.saveAs(stlPath);
    const stl = readFileSync(stlPath);
    const facets = stl.readUInt32LE(80);
    expect(facets).toBeGreaterThan(100);
    expect(stl.length).toBe(84 + 50 * facets);
    // Facet normals are unit vectors (or zero), and the part spans more than the 20 mm inner diameter asked for.
    let lo = Infinity;
    let hi = -Infinity;
    for (let f = 0; f < facets; f++) {
      const at = 84 + 50 * f;
      const n = Math.hypot(stl.readFloatLE(at), stl.readFloatLE(at + 4), stl.readFloatLE(at + 8));
      expect(n === 0 || Math.abs(n - 1) < 1e-3).toBe(true);
      for (let v = 0; v < 3; v++) {
        const x = stl.readFloatLE(at + 12 + 12 * v);
        lo = Math.min(lo, x);
        hi = Math.max(hi, x);
      }
    }
    expect(hi - lo).toBeGreaterThan(20);
    expect(await page.textContent('#cautions')).toMatch(/load-bearing/);

    // Move ring B out through ring A (centre x from 0.5 to 3): the linking would change, so it is refused.
    const bx = page.locator('#rings tr[data-ring="1"] input[data-field="center"][data-k="0"]');
    const before = await bx.inputValue();
    await bx.fill('3');
    await bx.press('Enter');
    await expect.poll(() => page.textContent('#message')).toMatch(/^Move refused: rings A and B would come unlinked/);
    expect(await bx.inputValue()).toBe(before);
    // A small move that keeps the link is taken, and the old result no longer describes the rings.
    const by = page.locator('#rings tr[data-ring="1"] input[data-field="center"][data-k="1"]');
    await by.fill('0.0001');
    await by.press('Enter');
    await expect.poll(() => page.textContent('#result')).toMatch(/cleared: the rings were moved/);
    expect(await page.getAttribute('#clearance', 'data-ok')).toBe('true');

    // Malformed files: JSON syntax, and a bad field with the CLI's own message.
    await page.setInputFiles('#file', { name: 'broken.json', mimeType: 'application/json', buffer: Buffer.from('{"format": "thickring-layout/1", "rings": [') });
    await expect.poll(() => page.textContent('#message')).toMatch(/^thickring: file 'broken\.json' is not valid JSON \(.*\): fix the syntax$/);
    const bad = { format: 'thickring-layout/1', rings: [
      { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: -2 },
      { name: 'B', center: [1, 0, 0], normal: [0, 1, 0], radius: 1 },
    ] };
    const badText = JSON.stringify(bad);
    const badPath = join(scratch, 'negative.json');
    writeFileSync(badPath, badText);
    const cliErr: string[] = [];
    const io: Io = { out: () => {}, err: (t) => cliErr.push(t), interactive: false };
    expect(await main(['measure', badPath], io)).toBe(2);
    await page.setInputFiles('#file', { name: 'negative.json', mimeType: 'application/json', buffer: Buffer.from(badText) });
    await expect.poll(() => page.textContent('#message')).toBe(cliErr.join('').trim());
    expect((await page.textContent('#message'))!.split('\n')).toHaveLength(1);
    expect(await page.getAttribute('body', 'data-loaded')).toBe('hopf');

    await page.close();
    expect(offsite).toEqual([]);
    expect(problems).toEqual([]);
  }, 280_000);

  it('after Compare, the 3D view and the ring list show the chosen point of the sweep (default the best)', async () => {
    const page = await context.newPage();
    const problems: string[] = [];
    // The page's worker pool warns about every solve attempt that failed (a thrown error or a dead worker).
    page.on('console', (m) => { if (m.type() === 'error' || (m.type() === 'warning' && /^solve \d+:/.test(m.text()))) problems.push(`console: ${m.text()}`); });
    page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
    await page.goto(ui.url);
    await page.waitForSelector('body[data-ready]', { state: 'attached', timeout: 60_000 });
    await page.click('#compare');
    const box = page.locator('#sweep-pick');
    await box.waitFor({ state: 'visible', timeout: 200_000 });
    await page.waitForFunction(() => !document.body.dataset['solving'], undefined, { timeout: 60_000 });
    const points = JSON.parse((await box.getAttribute('data-points'))!) as { epsilon: number; tube: number }[];
    expect(points.length).toBeGreaterThanOrEqual(2);
    // Breaking the symmetry cannot thicken the tight Hopf link: every point of the curve is at tube = R/2 = 0.5
    // (Cantarella, Kusner, Sullivan, Invent. Math. 150 (2002)).
    for (const p of points) expect(Math.abs(p.tube - 0.5) / 0.5).toBeLessThan(HOPF_REL_TOL);
    // The default is the best point: no point has a thicker tube.
    const chosen = Number(await box.getAttribute('data-index'));
    expect(Math.max(...points.map((p) => p.tube))).toBeLessThanOrEqual(points[chosen]!.tube);

    // What the view draws realises the chosen point: brute-force least core distance (tests/reference) is
    // twice its tube, the tubes drawn are its tube, and the ring list shows the same poses.
    const shown = async (): Promise<{ index: number; tube: number }> => {
      const index = Number(await box.getAttribute('data-index'));
      const tube = points[index]!.tube;
      const rings = JSON.parse((await page.getAttribute('#view', 'data-rings'))!) as RefRing[];
      const tubes = JSON.parse((await page.getAttribute('#view', 'data-tubes'))!) as number[];
      expect(rings).toHaveLength(2);
      for (const t of tubes) expect(Math.abs(t - tube) / tube).toBeLessThan(1e-12);
      const least = Math.min(...refMinima(rings[0]!, rings[1]!).map((m) => m.d));
      expect(Math.abs(least - 2 * tube) / (2 * tube)).toBeLessThan(1e-7);
      for (const [i, r] of rings.entries()) {
        for (const [k, x] of r.center.entries()) {
          const cell = page.locator(`#rings tr[data-ring="${i}"] input[data-field="center"][data-k="${k}"]`);
          expect(Math.abs(Number(await cell.inputValue()) - x)).toBeLessThan(1e-6);
        }
      }
      return { index, tube };
    };
    expect((await shown()).index).toBe(chosen);
    // The slider walks the sweep: the other end is shown the same way.
    await page.focus('#sweep-point');
    await page.keyboard.press(chosen === 0 ? 'End' : 'Home');
    await expect.poll(() => box.getAttribute('data-index')).toBe(String(chosen === 0 ? points.length - 1 : 0));
    await shown();
    expect(await page.textContent('#sweep-point-text')).toMatch(/^point \d+ of \d+: departure [\d.e+-]+ layout units, tube [\d.e+-]+ layout units/);
    await page.screenshot({ path: join(ARTIFACTS, 'ui-compare.png') });
    await page.close();
    expect(problems).toEqual([]);
  }, 280_000);

  it('the report draws its 3D view with the inlined three.js view, offline from file://', async () => {
    const viewSource = loadViewSource();
    expect(viewSource, 'dist/report-view is built by npm run build').not.toBeNull();
    const path = join(ARTIFACTS, 'report-three.html');
    writeFileSync(path, buildReportHtml(hopfResult(), { plotlySource: loadPlotlySource(), viewSource, sourceName: 'fixture.json' }).html);
    const page = await context.newPage();
    const problems: string[] = [];
    const attempted: string[] = [];
    await page.route('**/*', (route) => {
      const u = route.request().url();
      if (/^(file|data|blob):/.test(u)) return route.continue();
      attempted.push(u);
      return route.abort();
    });
    page.on('console', (m) => { if (m.type() === 'error') problems.push(`console: ${m.text()}`); });
    page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
    await page.goto(pathToFileURL(path).href, { waitUntil: 'commit' });
    await page.waitForSelector('body[data-plots]', { state: 'attached', timeout: 200_000 });
    expect(await page.getAttribute('body', 'data-plots')).toBe('rendered');
    const canvases = await page.evaluate(() =>
      Array.from(document.querySelectorAll('.three-view canvas')).filter((c) => (c as HTMLCanvasElement).width > 0).length);
    expect(canvases).toBe(1);
    await page.locator('.three-view').scrollIntoViewIfNeeded();
    await page.screenshot({ path: join(ARTIFACTS, 'report-three.png') });
    await page.close();
    expect(attempted).toEqual([]);
    expect(problems).toEqual([]);
  }, 240_000);
});
