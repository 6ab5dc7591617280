// The standalone HTML report: one file, plotting library inlined, no network access, every text
// escaped. Built from a result file (inflate or compare) and, when available, a play analysis.
import { CAUTIONS } from '../src/fabricate/cautions.js';
import { optimalityOf, optimalityText, type CompareResult, type SolveResult } from '../src/model/result.js';
import { escapeHtml as h, jsonForScript, scriptSource } from './escape.js';
import { threeViewData } from './threeView.js';
import { DIMENSIONLESS, lengthUnit, num, percent, vec } from './format.js';
import { isCompareResult, symmetryLabel } from './kind.js';
import { historyPlot, spreadPlot, sweepPlot, tubeView, gainText, type PlotSpec, type StartGroup } from './plots.js';
import { figureRows } from './summary.js';
import { BROKEN_COLOUR, PAGE_CSS, SYMMETRIC_COLOUR, ringColour } from './theme.js';

/** A play analysis reduced to what the report shows (see reports/playView.ts). */
export interface PlayView {
  locked: boolean;
  headline: string;
  rows: { label: string; value: string; unit: string }[];
  notes: string[];
}

export interface ReportOptions {
  /** Source text of plotly.min.js, inlined verbatim (escaped for a script element). */
  plotlySource: string;
  play?: PlayView | null;
  /** Shown in the footer; omit for a byte-reproducible file. */
  generatedAt?: string;
  /** Name of the result file the report was built from. */
  sourceName?: string;
  /**
   * Internal, for bench/ui.ts only: the former page that runs the plotting library inline and draws every
   * plot while loading (the browser froze for many seconds). Default: the lazy page.
   */
  eagerPlots?: boolean;
  /** Source of the three.js 3D view (loadViewSource()); when given, the 3D views use it instead of plotly. */
  viewSource?: string | null;
}

export interface BuiltReport {
  html: string;
  /** Ids of the plot containers, in page order. */
  plots: string[];
  /** Section headings, in page order. */
  sections: string[];
}

const CONTENT_SECURITY_POLICY =
  "default-src 'none'; script-src 'unsafe-inline' 'unsafe-eval' blob:; style-src 'unsafe-inline'; " +
  "img-src data: blob:; font-src data:; worker-src blob:; connect-src 'none'; form-action 'none'; base-uri 'none'";

export function buildReportHtml(result: SolveResult | CompareResult, options: ReportOptions): BuiltReport {
  const compare = isCompareResult(result) ? result : null;
  const unit = lengthUnit(result);
  const plots: PlotSpec[] = [];
  const sections: { title: string; lead: string; body: string }[] = [];

  sections.push({
    title: 'Figures',
    lead: compare
      ? 'The two optima side by side. Lengths are in the layout\u2019s units; ratios are dimensionless.'
      : 'The thickest common tube and how sure we are of it. Lengths are in the layout\u2019s units; ratios are dimensionless.',
    body: compare ? compareFigures(compare) : figuresTable([['', result]]),
  });

  if (compare) {
    const a = tubeView(compare.symmetric, 'view-symmetric');
    const b = tubeView(compare.broken, 'view-broken');
    plots.push(a, b);
    sections.push({
      title: 'The rings in 3D',
      lead: 'Drag to turn, scroll to zoom. Tubes are drawn as glass so the core circles and the struts ' +
        '(closest pairs that carry load, wider when the force is larger) show through; the buttons switch to solid tubes.',
      body: `<div class="pair"><div><p class="plot-title">symmetric optimum</p>${plotDiv(a)}</div>` +
        `<div><p class="plot-title">symmetry broken</p>${plotDiv(b)}</div></div>`,
    });
    const sweep = sweepPlot(compare, 'sweep');
    if (sweep) plots.push(sweep);
    sections.push({
      title: 'Breaking the symmetry',
      lead: `Thickest tube when the layout may depart from ${h(symmetryLabel(compare.symmetric.symmetry))} ` +
        `by at most \u03b5 (distance to its symmetrised copy, ${h(unit)}). At \u03b5 = 0 this is the symmetric optimum; ` +
        `it rises to the unconstrained optimum. Gain: ${h(gainText(compare))}.`,
      body: (sweep ? plotDiv(sweep) : '<p class="note">No sweep was recorded in this result.</p>') + changesTable(compare),
    });
  } else {
    const v = tubeView(result, 'view');
    plots.push(v);
    sections.push({
      title: 'The rings in 3D',
      lead: 'Drag to turn, scroll to zoom. Tubes are drawn as glass so the core circles and the struts ' +
        '(closest pairs that carry load, wider when the force is larger) show through; the buttons switch to solid tubes.',
      body: plotDiv(v),
    });
  }

  const groups: StartGroup[] = compare
    ? [
      { label: 'symmetric', colour: SYMMETRIC_COLOUR, starts: compare.symmetric.starts },
      { label: 'broken', colour: BROKEN_COLOUR, starts: compare.broken.starts },
    ]
    : [{ label: 'starts', colour: BROKEN_COLOUR, starts: result.starts }];
  const hist = historyPlot(groups, unit, 'history');
  const spread = spreadPlot(groups, unit, (compare ? compare.broken : result).bound?.tube ?? null, 'spread');
  if (hist) plots.push(hist);
  if (spread) plots.push(spread);
  if (hist || spread) {
    sections.push({
      title: 'How the search went',
      lead: 'Left: tube radius after each outer iteration of every start. Right: the final tube of every start ' +
        '(coloured by status) \u2014 a tight cluster at the top means the best value was found repeatedly.',
      body: `<div class="pair"><div>${hist ? plotDiv(hist) : '<p class="note">No iteration history recorded.</p>'}</div>` +
        `<div>${spread ? plotDiv(spread) : '<p class="note">No starts recorded.</p>'}</div></div>`,
    });
  }

  if (options.play) sections.push(playSection(options.play));
  sections.push({
    title: 'Rings and contacts',
    lead: `Pose of every ring at the optimum (${h(unit)}); aspect ratio = inner diameter / wire diameter (dimensionless).`,
    body: ringsTable(result) + contactsTable(result),
  });
  sections.push({
    title: 'What was checked',
    lead: '',
    body: checksBlock(compare ? [['symmetric', compare.symmetric], ['broken', compare.broken]] : [['', result]]) +
      (compare ? comparisonChecks(compare) : ''),
  });
  sections.push({ title: 'Cautions', lead: '', body: cautions() });

  const html = page(result, compare, sections, plots, options);
  return { html, plots: plots.map((p) => p.id), sections: sections.map((s) => s.title) };
}

function page(
  result: SolveResult, compare: CompareResult | null, sections: { title: string; lead: string; body: string }[],
  plots: PlotSpec[], options: ReportOptions,
): string {
  const unit = lengthUnit(result);
  const title = compare ? `${result.spec}: symmetric vs symmetry broken` : `${result.spec}: thickest tubes`;
  const kicker = compare ? 'thickring \u00b7 symmetry comparison' : `thickring \u00b7 ${result.command} report`;
  const sub = [
    `${result.rings.length} rings`,
    `symmetry ${symmetryLabel(compare ? compare.symmetric.symmetry : result.symmetry)}`,
    `lengths in ${unit}`,
    options.sourceName ? `from ${options.sourceName}` : '',
  ].filter(Boolean).join(' \u00b7 ');
  const body = sections.map((s, i) =>
    `<section class="block"><h2><span class="num">${String(i + 1).padStart(2, '0')}</span>${h(s.title)}</h2>` +
    (s.lead ? `<p class="lead">${s.lead}</p>` : '') + s.body + '</section>').join('\n');
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="${h(CONTENT_SECURITY_POLICY)}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="thickring 0.1.0">
<title>${h(title)}</title>
<style>${PAGE_CSS}</style>
</head>
<body>
<header class="masthead"><p class="kicker">${h(kicker)}</p><h1>${h(title)}</h1><p class="sub">${h(sub)}</p></header>
<main>
${cards(result, compare)}
${body}
</main>
<footer>Made by thickring 0.1.0${options.generatedAt ? ` on ${h(options.generatedAt)}` : ''}. This page works offline: everything it needs is inside the file.</footer>
${options.eagerPlots
    ? `<script>${scriptSource(options.plotlySource)}</script>`
    : `<script type="text/plain" id="thickring-plotly">${scriptSource(options.plotlySource)}</script>`}
${!options.eagerPlots && options.viewSource ? `<script type="text/plain" id="thickring-view">${scriptSource(options.viewSource)}</script>` : ''}
<script type="application/json" id="thickring-plots">${jsonForScript(options.eagerPlots || !options.viewSource ? plots : withThreeViews(plots, result, compare))}</script>
<script>${options.eagerPlots ? BOOT_SCRIPT : LAZY_BOOT_SCRIPT}</script>
</body>
</html>
`;
}

// Draws every plot; records success/failure on <body> so tests and readers can tell.
const BOOT_SCRIPT = `
(function () {
  var specs = JSON.parse(document.getElementById('thickring-plots').textContent);
  var config = { displaylogo: false, responsive: true, modeBarButtonsToRemove: ['sendDataToCloud'] };
  var done = specs.map(function (s) {
    var el = document.getElementById(s.id);
    if (typeof Plotly === 'undefined') { return Promise.reject(new Error('plotting library missing')); }
    return Plotly.newPlot(el, s.data, s.layout, config).catch(function (e) {
      el.textContent = 'This plot could not be drawn: ' + (e && e.message ? e.message : e);
      throw e;
    });
  });
  Promise.all(done).then(function () {
    document.body.setAttribute('data-plots', 'rendered');
  }, function (e) {
    document.body.setAttribute('data-plots', 'failed');
    console.error('thickring report: ' + (e && e.message ? e.message : e));
  });
})();
`;

// The page first, the plots after: the plotting library (~5 MB) sits in the file as inert text, so the
// browser shows and scrolls the page at once. It is started from a blob: URL as an async script (the
// browser can compile that off the main thread) when a plot nears the screen, or when the page is idle.
// Plots on screen are drawn first, the rest one per idle moment, so no single task holds the page for long.
// data-plots on <body> says 'rendered' once every plot is drawn ('failed' if one could not be).
const LAZY_BOOT_SCRIPT = `
(function () {
  var specs = JSON.parse(document.getElementById('thickring-plots').textContent);
  var config = { displaylogo: false, responsive: true, modeBarButtonsToRemove: ['sendDataToCloud'] };
  var loading = null, viewLoading = null;
  function inert(id) {
    return new Promise(function (ok, fail) {
      var url = URL.createObjectURL(new Blob([document.getElementById(id).textContent], { type: 'text/javascript' }));
      var s = document.createElement('script');
      s.async = true;
      s.src = url;
      s.onload = function () { URL.revokeObjectURL(url); ok(); };
      s.onerror = function () { fail(new Error('a script of the page could not be started')); };
      document.head.appendChild(s);
    });
  }
  function viewer() {
    viewLoading = viewLoading || inert('thickring-view').then(function () {
      if (typeof ThickringView === 'undefined') { throw new Error('3D view missing'); }
    });
    return viewLoading;
  }
  function library() {
    loading = loading || inert('thickring-plotly').then(function () {
      if (typeof Plotly === 'undefined') { throw new Error('plotting library missing'); }
    });
    return loading;
  }
  var left = specs.length, failed = false, queue = [], busy = false;
  var state = specs.map(function () { return 'waiting'; });
  function finish(e) {
    if (e) { failed = true; console.error('thickring report: ' + (e && e.message ? e.message : e)); }
    if (--left === 0) { document.body.setAttribute('data-plots', failed ? 'failed' : 'rendered'); }
  }
  function pump() {
    if (busy || queue.length === 0) { return; }
    busy = true;
    var k = queue.shift();
    var s = specs[k], el = document.getElementById(s.id);
    (s.three ? viewer().then(function () { return ThickringView.mount(el, s.three); }) : library().then(function () {
      return Plotly.newPlot(el, s.data, s.layout, config);
    })).then(function () { finish(null); }, function (e) {
      el.textContent = 'This plot could not be drawn: ' + (e && e.message ? e.message : e);
      finish(e);
    }).then(function () { busy = false; setTimeout(pump, 0); });
  }
  function want(k, first) {
    if (state[k] !== 'waiting') { return; }
    state[k] = 'queued';
    if (first) { queue.unshift(k); } else { queue.push(k); }
    pump();
  }
  var idle = window.requestIdleCallback || function (f) { return setTimeout(f, 200); };
  function later() {
    idle(function () {
      for (var k = 0; k < specs.length; k++) { if (state[k] === 'waiting') { want(k, false); break; } }
      if (state.indexOf('waiting') >= 0) { later(); }
    });
  }
  if ('IntersectionObserver' in window) {
    var seen = new IntersectionObserver(function (entries) {
      entries.forEach(function (en) {
        if (!en.isIntersecting) { return; }
        seen.unobserve(en.target);
        want(Number(en.target.getAttribute('data-plot-index')), true);
      });
    }, { rootMargin: '300px 0px' });
    specs.forEach(function (s, k) { var el = document.getElementById(s.id); el.setAttribute('data-plot-index', String(k)); seen.observe(el); });
  }
  // Let the first paint happen before anything heavy starts.
  setTimeout(later, 50);
})();
`;

/** The tube views as data for the three.js view (drawn in a moment under software rendering, unlike plotly's). */
function withThreeViews(plots: PlotSpec[], result: SolveResult, compare: CompareResult | null): unknown[] {
  const source = (id: string): SolveResult | null =>
    id === 'view' ? result : id === 'view-symmetric' ? compare?.symmetric ?? null : id === 'view-broken' ? compare?.broken ?? null : null;
  return plots.map((p) => {
    const r = source(p.id);
    return r ? { id: p.id, three: threeViewData(r) } : p;
  });
}

function plotDiv(p: PlotSpec): string {
  return `<div class="plot${p.tall ? ' tall' : ''}" id="${h(p.id)}"></div>`;
}

function cards(result: SolveResult, compare: CompareResult | null): string {
  const unit = lengthUnit(result);
  const card = (label: string, value: string, u: string): string =>
    `<div class="card"><div class="label">${h(label)}</div><div class="value">${h(value)}</div><div class="unit">${h(u)}</div></div>`;
  const list = [
    card('tube radius', num(result.tube), unit),
    card('tube / core', num(result.tubeOverCore, 4), DIMENSIONLESS),
    card('aspect ratio', num(result.aspectRatio, 4), `inner / wire diameter, smallest over the rings${result.aspectRatioRing ? ` (ring ${result.aspectRatioRing})` : ''}, dimensionless`),
  ];
  if (compare) {
    list.push(card('symmetry gain', num(compare.gain, 4), `${unit} (${num(compare.gainPercent, 3)} %)`));
  }
  list.push(card('gap to bound', result.bound ? percent(result.bound.gap) : 'n/a',
    result.bound ? `bound ${num(result.bound.tube)} ${unit}` : 'no bound for this layout'));
  list.push(card('status', result.status, optimalityText(optimalityOf(result), result.symmetry)));
  return `<div class="cards">${list.join('')}</div>`;
}

function badge(text: string, kind: 'ok' | 'warn' | 'bad'): string {
  return `<span class="badge ${kind}">${h(text)}</span>`;
}

function statusBadge(status: string): string {
  return badge(status, status === 'optimal' ? 'ok' : status === 'stalled' ? 'warn' : 'bad');
}

function cell(label: string, value: string): string {
  if (label === 'status') return statusBadge(value);
  if (label === 'optimality') return badge(value, value === optimalityText('none') ? 'warn' : 'ok');
  if (label === 'independent check') return badge(value, value === 'passed' ? 'ok' : 'bad');
  return h(value);
}

function figuresTable(cols: [string, SolveResult][]): string {
  const rows = cols.map(([, r]) => figureRows(r));
  const head = `<thead><tr><th>quantity</th>${cols.map(([l]) => `<th class="n">${h(l || 'value')}</th>`).join('')}<th>unit</th></tr></thead>`;
  const body = rows[0]!.map(([label, , u], i) =>
    `<tr><th scope="row">${h(label)}</th>${rows.map((r) => `<td class="n">${cell(label, r[i]![1])}</td>`).join('')}` +
    `<td class="u">${h(u || rows.map((r) => r[i]![2]).find(Boolean) || '')}</td></tr>`).join('');
  return `<table class="figures">${head}<tbody>${body}</tbody></table>`;
}

function compareFigures(c: CompareResult): string {
  const unit = lengthUnit(c);
  const pct = Number.isFinite(c.gainPercent) ? ` (${c.gainPercent >= 0 ? '+' : ''}${num(c.gainPercent, 3)} %)` : '';
  const gain = Number.isFinite(c.gain) ? `${c.gain > 0 ? '+' : ''}${num(c.gain, 4)}${pct}` : 'n/a';
  const gainRow = `<tr><th scope="row">gain (broken \u2212 symmetric)</th><td class="n"></td><td class="n">${h(gain)}</td><td class="u">${h(unit)}</td></tr>`;
  return figuresTable([['symmetric', c.symmetric], ['broken', c.broken]]).replace('</tbody>', `${gainRow}</tbody>`);
}

function changesTable(c: CompareResult): string {
  if (c.changes.length === 0) return '';
  const unit = lengthUnit(c);
  const rows = c.changes.map((ch) =>
    `<tr><th scope="row">${h(ch.name)}</th><td class="n">${h(num(ch.displacement, 4))}</td><td class="u">${h(unit)}</td>` +
    `<td class="n">${h(num(ch.tiltDegrees, 3))}</td><td class="u">degrees</td></tr>`).join('');
  return `<details open><summary>How far each ring moved (broken vs symmetric, after best rigid alignment)</summary>` +
    `<table class="figures"><thead><tr><th>ring</th><th>centre moved</th><th></th><th>normal tilted</th><th></th></tr></thead><tbody>${rows}</tbody></table></details>`;
}

function ringsTable(r: SolveResult): string {
  const rows = r.rings.map((g, i) =>
    `<tr><th scope="row"><span style="color:${ringColour(i)}">\u25cf</span> ${h(g.name)}</th>` +
    `<td class="n">${h(vec(g.center))}</td><td class="n">${h(vec(g.normal))}</td>` +
    `<td class="n">${h(num(g.radius))}</td><td class="n">${h(num(g.tube))}</td><td class="n">${h(num(g.aspectRatio, 4))}</td></tr>`).join('');
  const unit = lengthUnit(r);
  return `<table class="figures"><thead><tr><th>ring</th><th>centre (${h(unit)})</th><th>normal (unit vector)</th>` +
    `<th>core radius R (${h(unit)})</th><th>tube r (${h(unit)})</th><th>aspect ratio</th></tr></thead><tbody>${rows}</tbody></table>`;
}

function contactsTable(r: SolveResult): string {
  if (r.contacts.length === 0) return '<p class="note">No active contacts were recorded.</p>';
  const unit = lengthUnit(r);
  const name = (i: number): string => r.rings[i]?.name ?? `#${i}`;
  const rows = r.contacts.map((c) =>
    `<tr><th scope="row">${h(name(c.a))} \u2013 ${h(name(c.b))}${c.continuum ? ' <span class="note">(continuum)</span>' : ''}</th>` +
    `<td class="n">${h(num(c.distance))}</td><td class="n">${h(num(c.force, 4))}</td>` +
    `<td class="n">${h(vec(c.onA, 3))}</td><td class="n">${h(vec(c.onB, 3))}</td></tr>`).join('');
  return `<details><summary>${r.contacts.length} active contacts (struts)</summary><table class="figures"><thead><tr><th>pair</th>` +
    `<th>core distance (${h(unit)})</th><th>force (dimensionless)</th><th>point on first core</th><th>point on second core</th></tr></thead>` +
    `<tbody>${rows}</tbody></table></details>`;
}

function playSection(p: PlayView): { title: string; lead: string; body: string } {
  const rows = p.rows.map((r) =>
    `<tr><th scope="row">${h(r.label)}</th><td class="n">${h(r.value)}</td><td class="u">${h(r.unit)}</td></tr>`).join('');
  return {
    title: 'Play: locked or rattling?',
    lead: `${badge(p.locked ? 'locked' : 'has play', p.locked ? 'ok' : 'warn')} ${h(p.headline)}`,
    body: `<table class="figures"><tbody>${rows}</tbody></table>` +
      (p.notes.length > 0
        ? `<details><summary>${p.notes.length} note${p.notes.length === 1 ? '' : 's'} on free motions and the analysis</summary>` +
          p.notes.map((n) => `<p class="note">${h(n)}</p>`).join('') + '</details>'
        : ''),
  };
}

function checksBlock(cols: [string, SolveResult][]): string {
  return cols.map(([label, r]) => {
    const lines = [
      `Certificate (${r.certificate.method}): ${r.certificate.note}`,
      ...r.verification.messages.map((m) => `Independent check: ${m}`),
    ];
    const head = label ? `<p class="plot-title">${h(label)}</p>` : '';
    return head + `<ul class="cautions">${lines.map((l) => `<li>${h(l)}</li>`).join('')}</ul>`;
  }).join('');
}

// Messages of the comparison itself (the sweep's re-checks), i.e. those not already under "broken".
function comparisonChecks(c: CompareResult): string {
  const own = c.verification.messages.filter((m) => !c.broken.verification.messages.includes(m));
  if (own.length === 0) return '';
  return `<p class="plot-title">comparison</p><ul class="cautions">${own.map((m) => `<li>${h(m)}</li>`).join('')}</ul>`;
}

function cautions(): string {
  const items = CAUTIONS;
  return `<ul class="cautions">${items.map((t) => `<li>${h(t)}</li>`).join('')}</ul>`;
}
