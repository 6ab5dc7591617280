// Plot descriptions (plotly data + layout as plain JSON) built from a result file; the HTML
// builder embeds them and a ten-line script hands them to plotly in the browser.
import type { CompareResult, SolveResult, StartRecord } from '../src/model/result.js';
import { plotlyText } from './escape.js';
import { lengthUnit, num, signed } from './format.js';
import {
  ACCENT, ACCENT_SOFT, BROKEN_COLOUR, CARD, INK, MUTED, RULE, SYMMETRIC_COLOUR,
  axis, baseLayout, ringColour, statusColour,
} from './theme.js';
import { circlePoints, torusGrid } from './torus.js';

export interface PlotSpec {
  id: string;
  data: Record<string, unknown>[];
  layout: Record<string, unknown>;
  tall?: boolean;
}

/** A named family of multistart runs (the symmetric and the broken search of a compare result). */
export interface StartGroup {
  label: string;
  colour: string;
  starts: StartRecord[];
}

/** Opacity of the tubes in "glass" mode: the cores and struts inside stay visible. */
const GLASS_OPACITY = 0.38;
/** Iteration histories longer than this are drawn on a log axis. */
const LOG_AXIS_ITERATIONS = 60;
/** Grid-point budget for all tori together, so large weaves stay responsive. */
const MESH_VERTEX_BUDGET = 80_000;

/** Interactive 3D view: one torus per ring, core circles, struts scaled by force, contact points. */
export function tubeView(result: SolveResult, id: string): PlotSpec {
  const unit = lengthUnit(result);
  const data: Record<string, unknown>[] = [];
  const tubeIndices: number[] = [];
  const perRing = MESH_VERTEX_BUDGET / Math.max(1, result.rings.length);
  const refine = Math.min(1, Math.sqrt(perRing / (72 * 20)));
  const around = Math.max(24, Math.round(72 * refine));
  const across = Math.max(10, Math.round(20 * refine));

  result.rings.forEach((ring, index) => {
    const m = torusGrid(ring.center, ring.normal, ring.radius, ring.tube, around, across);
    const colour = ringColour(index);
    tubeIndices.push(data.length);
    data.push({
      type: 'surface', ...m,
      name: plotlyText(ring.name), legendgroup: `ring-${index}`, showlegend: true,
      colorscale: [[0, colour], [1, colour]], showscale: false, opacity: GLASS_OPACITY,
      contours: { x: { highlight: false }, y: { highlight: false }, z: { highlight: false } },
      lighting: { ambient: 0.55, diffuse: 0.7, specular: 0.35, roughness: 0.5, fresnel: 0.3 },
      lightposition: { x: 2000, y: 1000, z: 3000 },
      hovertemplate:
        `<b>ring ${plotlyText(ring.name)}</b><br>core radius ${num(ring.radius)} ${plotlyText(unit)}` +
        `<br>tube radius ${num(ring.tube)} ${plotlyText(unit)}<br>aspect ratio ${num(ring.aspectRatio, 4)} (dimensionless)<extra></extra>`,
    });
  });

  const cores = { x: [] as (number | null)[], y: [] as (number | null)[], z: [] as (number | null)[] };
  for (const ring of result.rings) {
    const c = circlePoints(ring.center, ring.normal, ring.radius);
    cores.x.push(...c.x, null);
    cores.y.push(...c.y, null);
    cores.z.push(...c.z, null);
  }
  data.push({
    type: 'scatter3d', mode: 'lines', ...cores, name: 'core circles',
    line: { color: INK, width: 2 }, hoverinfo: 'skip',
  });

  addStruts(result, unit, data);

  const sceneAxis = (label: string): Record<string, unknown> => ({
    title: { text: `${label}, ${plotlyText(unit)}`, font: { size: 11 } },
    backgroundcolor: '#f1ece1', showbackground: true, gridcolor: '#e0d8c8', zerolinecolor: RULE,
    color: MUTED, nticks: 5, showspikes: false, tickfont: { size: 10 },
  });
  const layout: Record<string, unknown> = {
    paper_bgcolor: CARD,
    font: baseLayout()['font'],
    margin: { l: 0, r: 0, t: 36, b: 8 },
    showlegend: true,
    legend: { orientation: 'h', x: 0, xanchor: 'left', y: 0, yanchor: 'top', font: { size: 12 }, bgcolor: 'rgba(0,0,0,0)' },
    hoverlabel: baseLayout()['hoverlabel'],
    scene: {
      aspectmode: 'data',
      xaxis: sceneAxis('x'), yaxis: sceneAxis('y'), zaxis: sceneAxis('z'),
      camera: { eye: { x: 1.35, y: -1.45, z: 0.95 } },
    },
    updatemenus: [{
      type: 'buttons', direction: 'right', x: 0, xanchor: 'left', y: 1.0, yanchor: 'bottom', pad: { b: 4 },
      bgcolor: CARD, bordercolor: RULE, font: { size: 12 }, showactive: true, active: 0,
      buttons: [
        { label: 'glass tubes', method: 'restyle', args: [{ opacity: GLASS_OPACITY }, tubeIndices] },
        { label: 'solid tubes', method: 'restyle', args: [{ opacity: 1 }, tubeIndices] },
      ],
    }],
  };
  return { id, data, layout, tall: true };
}

// Struts go core point to core point, wider and darker with force; markers sit where the tubes touch.
function addStruts(result: SolveResult, unit: string, data: Record<string, unknown>[]): void {
  const contacts = result.contacts ?? [];
  if (contacts.length === 0) return;
  const fmax = Math.max(...contacts.map((c) => (Number.isFinite(c.force) ? c.force : 0)), 0);
  const px: number[] = [], py: number[] = [], pz: number[] = [], size: number[] = [], colour: number[] = [];
  const text: string[] = [];
  // Strongest first, so each legend entry shows the style of a loaded strut.
  const ordered = [...contacts].sort((p, q) => (Number.isFinite(q.force) ? q.force : 0) - (Number.isFinite(p.force) ? p.force : 0));
  let shownLoaded = false, shownIdle = false;
  ordered.forEach((c) => {
    const ra = result.rings[c.a], rb = result.rings[c.b];
    if (!ra || !rb) return;
    const f = Number.isFinite(c.force) ? c.force : 0;
    const rel = fmax > 0 ? f / fmax : 0;
    const names = `${plotlyText(ra.name)}–${plotlyText(rb.name)}`;
    const loaded = rel > 0;
    const first = loaded ? !shownLoaded : !shownIdle;
    if (loaded) shownLoaded = true; else shownIdle = true;
    data.push({
      type: 'scatter3d', mode: 'lines',
      x: [c.onA[0], c.onB[0]], y: [c.onA[1], c.onB[1]], z: [c.onA[2], c.onB[2]],
      line: { color: loaded ? ACCENT : MUTED, width: 2 + 9 * rel, dash: loaded ? 'solid' : 'dash' },
      name: loaded ? 'struts (width ∝ force)' : 'touching, no force',
      legendgroup: loaded ? 'struts' : 'idle', showlegend: first,
      hovertemplate: `strut ${names}<br>force ${num(f, 4)} (dimensionless)<extra></extra>`,
    });
    // The touching point divides the strut in the ratio of the two tube radii.
    const t = ra.tube + rb.tube > 0 ? ra.tube / (ra.tube + rb.tube) : 0.5;
    px.push(c.onA[0] + t * (c.onB[0] - c.onA[0]));
    py.push(c.onA[1] + t * (c.onB[1] - c.onA[1]));
    pz.push(c.onA[2] + t * (c.onB[2] - c.onA[2]));
    size.push(4 + 7 * rel);
    colour.push(f);
    text.push(
      `contact ${names}${c.continuum ? ' (one point of a continuum)' : ''}<br>` +
      `core distance ${num(c.distance)} ${plotlyText(unit)}<br>force ${num(f, 4)} (dimensionless)`,
    );
  });
  data.push({
    type: 'scatter3d', mode: 'markers', x: px, y: py, z: pz, name: 'contact points',
    text, hovertemplate: '%{text}<extra></extra>',
    marker: {
      size, color: colour, cmin: 0, cmax: fmax > 0 ? fmax : 1,
      colorscale: [[0, ACCENT_SOFT], [0.5, ACCENT], [1, INK]],
      line: { color: CARD, width: 0.5 },
      colorbar: {
        title: { text: 'strut force<br>(dimensionless)', side: 'right' }, thickness: 12, len: 0.5,
        x: 1.0, y: 0.35, outlinewidth: 0, tickfont: { size: 11 },
      },
    },
  });
}

/** The symmetry-breaking curve: thickest tube against the allowed departure from symmetry. */
export function sweepPlot(result: CompareResult, id: string): PlotSpec | null {
  const pts = [...(result.sweep ?? [])].sort((a, b) => a.epsilon - b.epsilon);
  if (pts.length === 0) return null;
  const unit = plotlyText(lengthUnit(result));
  const symmetric = result.symmetric.tube, broken = result.broken.tube;
  const xmax = Math.max(...pts.map((p) => p.epsilon), 0);
  const data: Record<string, unknown>[] = [{
    type: 'scatter', mode: 'lines', x: [pts[0]!.epsilon, pts[pts.length - 1]!.epsilon], y: [symmetric, symmetric],
    line: { width: 0 }, hoverinfo: 'skip', showlegend: false,
  }, {
    type: 'scatter', mode: 'lines+markers', name: 'thickest tube at this departure',
    fill: 'tonexty', fillcolor: 'rgba(192,112,63,0.12)',
    x: pts.map((p) => p.epsilon), y: pts.map((p) => p.tube),
    line: { color: BROKEN_COLOUR, width: 3, shape: 'linear' },
    marker: { size: 9, color: pts.map((p) => statusColour(p.status)), line: { color: CARD, width: 1.5 } },
    text: pts.map((p) => p.status),
    hovertemplate: `departure %{x:.4g} ${unit}<br>tube %{y:.5g} ${unit}<br>%{text}<extra></extra>`,
  }];
  const level = (y: number, colour: string, label: string): [Record<string, unknown>, Record<string, unknown>] => [
    { type: 'line', xref: 'paper', x0: 0, x1: 1, y0: y, y1: y, line: { color: colour, width: 1.5, dash: 'dot' } },
    {
      xref: 'paper', x: 1, xanchor: 'right', y, yanchor: 'bottom', showarrow: false,
      text: label, font: { color: colour, size: 12 },
    },
  ];
  const [s1, a1] = level(symmetric, SYMMETRIC_COLOUR, `symmetric optimum ${num(symmetric)} ${unit}`);
  const [s2, a2] = level(broken, BROKEN_COLOUR, `unconstrained optimum ${num(broken)} ${unit}`);
  const lo = Math.min(symmetric, broken, ...pts.map((p) => p.tube));
  const hi = Math.max(symmetric, broken, ...pts.map((p) => p.tube));
  const pad = Math.max((hi - lo) * 0.25, Math.abs(hi) * 1e-3);
  const layout = {
    ...baseLayout(),
    xaxis: axis({ title: { text: `allowed departure from symmetry ε (${unit})` }, range: [-0.03 * xmax, 1.05 * xmax || 1] }),
    yaxis: axis({ title: { text: `tube radius (${unit})` }, range: [lo - pad, hi + pad] }),
    shapes: [s1, s2],
    annotations: [a1, a2],
    showlegend: false,
    margin: { l: 72, r: 24, t: 16, b: 56 },
  };
  return { id, data, layout };
}

/** Tube radius after each outer iteration, one line per start; the best start of each group drawn bold. */
export function historyPlot(groups: StartGroup[], unit: string, id: string): PlotSpec | null {
  const data: Record<string, unknown>[] = [];
  const u = plotlyText(unit);
  for (const g of groups) {
    const best = bestIndex(g.starts);
    g.starts.forEach((s, k) => {
      if (!s.history || s.history.length === 0) return;
      const isBest = k === best;
      data.push({
        type: 'scatter', mode: 'lines', name: isBest ? `${plotlyText(g.label)}: best start` : plotlyText(g.label),
        legendgroup: `${g.label}-${isBest ? 'best' : 'rest'}`,
        showlegend: isBest || !data.some((d) => d['legendgroup'] === `${g.label}-rest`),
        x: s.history.map((_, i) => i + 1), y: s.history,
        line: { color: g.colour, width: isBest ? 3 : 1.2 }, opacity: isBest ? 1 : 0.45,
        hovertemplate: `${plotlyText(g.label)}, seed ${s.seed}<br>iteration %{x}<br>tube %{y:.5g} ${u}<extra></extra>`,
      });
    });
  }
  if (data.length === 0) return null;
  // One long stalled start would squash the others into the left edge: use a log axis then.
  const longest = Math.max(...groups.flatMap((g) => g.starts.map((s) => s.history?.length ?? 0)));
  const layout = {
    ...baseLayout(),
    xaxis: axis({ title: { text: `outer iteration (count${longest > LOG_AXIS_ITERATIONS ? ', log scale' : ''})` }, ...(longest > LOG_AXIS_ITERATIONS ? { type: 'log' } : {}) }),
    yaxis: axis({ title: { text: `tube radius (${u})` } }),
  };
  return { id, data, layout };
}

/**
 * Final tube of every start as a strip (over a box when there are enough), coloured by status, with
 * the packing bound. Failed and infeasible starts have no meaningful tube: they are counted in the
 * category label instead of being drawn at zero, which would flatten everything else.
 */
export function spreadPlot(groups: StartGroup[], unit: string, bound: number | null, id: string): PlotSpec | null {
  const used = groups.filter((g) => g.starts.length > 0);
  if (used.length === 0) return null;
  const u = plotlyText(unit);
  const data: Record<string, unknown>[] = [];
  const solved = (s: StartRecord): boolean => (s.status === 'optimal' || s.status === 'stalled') && Number.isFinite(s.tube);
  used.forEach((g, gi) => {
    const ys = g.starts.filter(solved).map((s) => s.tube);
    if (ys.length < 5) return;
    data.push({
      type: 'box', x0: gi, y: ys, name: plotlyText(g.label), boxpoints: false,
      width: 0.5, fillcolor: 'rgba(0,0,0,0)', line: { color: g.colour, width: 1.5 }, showlegend: false,
      hoverinfo: 'skip',
    });
  });
  const byStatus = new Map<string, { x: number[]; y: number[]; text: string[] }>();
  used.forEach((g, gi) => {
    g.starts.forEach((s, k) => {
      if (!solved(s)) return;
      const e = byStatus.get(s.status) ?? { x: [], y: [], text: [] };
      e.x.push(gi + jitter(s.seed, k));
      e.y.push(s.tube);
      e.text.push(`${plotlyText(g.label)}, seed ${s.seed}, ${s.iterations} iterations` +
        (s.retries > 0 ? `, ${s.retries} worker restarts` : ''));
      byStatus.set(s.status, e);
    });
  });
  for (const [status, e] of byStatus) {
    data.push({
      type: 'scatter', mode: 'markers', name: plotlyText(status), x: e.x, y: e.y, text: e.text,
      marker: { size: 10, color: statusColour(status), opacity: 0.85, line: { color: CARD, width: 1 } },
      hovertemplate: `%{text}<br>final tube %{y:.5g} ${u}<extra>${plotlyText(status)}</extra>`,
    });
  }
  const shapes: Record<string, unknown>[] = [];
  const annotations: Record<string, unknown>[] = [];
  const tubes = used.flatMap((g) => g.starts.filter(solved).map((s) => s.tube));
  const top = tubes.length ? Math.max(...tubes) : 0;
  const bottom = tubes.length ? Math.min(...tubes) : 0;
  // Show the bound only when it is near enough not to squash the spread into one line.
  if (bound !== null && Number.isFinite(bound) && tubes.length > 0 && bound - top <= 2 * Math.max(top - bottom, 0.05 * top)) {
    shapes.push({ type: 'line', xref: 'paper', x0: 0, x1: 1, y0: bound, y1: bound, line: { color: MUTED, dash: 'dash', width: 1.2 } });
    annotations.push({ xref: 'paper', x: 0, xanchor: 'left', y: bound, yanchor: 'bottom', showarrow: false, text: `packing bound ${num(bound)} ${u}`, font: { color: MUTED, size: 12 } });
  }
  const label = (g: StartGroup): string => {
    const lost = g.starts.filter((s) => !solved(s)).length;
    return plotlyText(g.label) + (lost > 0 ? `<br><span style="font-size:11px">${g.starts.length - lost} of ${g.starts.length} starts solved</span>` : '');
  };
  const layout = {
    ...baseLayout(),
    xaxis: axis({ tickvals: used.map((_, i) => i), ticktext: used.map(label), range: [-0.6, used.length - 0.4], zeroline: false, showgrid: false }),
    yaxis: axis({ title: { text: `final tube radius (${u})` } }),
    shapes, annotations,
  };
  return { id, data, layout };
}

/** Describe a gain for captions: "+0.0159 mm (+5.26 %)". */
export function gainText(result: CompareResult): string {
  const unit = lengthUnit(result);
  const pct = Number.isFinite(result.gainPercent) ? ` (${result.gainPercent >= 0 ? '+' : ''}${num(result.gainPercent, 3)} %)` : '';
  return `${signed(result.gain, unit)}${pct}`;
}

function bestIndex(starts: StartRecord[]): number {
  let best = -1, t = -Infinity;
  starts.forEach((s, k) => {
    if (s.status !== 'failed' && s.status !== 'infeasible' && s.tube > t) { t = s.tube; best = k; }
  });
  return best;
}

// Deterministic horizontal scatter so a report built twice from one result is byte-identical.
function jitter(seed: number, k: number): number {
  let h = (Math.imul(seed | 0, 2654435761) ^ Math.imul(k + 1, 40503)) >>> 0;
  h = Math.imul(h ^ (h >>> 15), 2246822507) >>> 0;
  return ((h % 1000) / 1000 - 0.5) * 0.36;
}
