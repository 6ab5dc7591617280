// The symmetry-breaking curve of a comparison, and the choice of one of its points: each point of the curve
// is a configuration (the thickest tube found within that departure from the symmetry), and the chosen one
// is shown in the 3D view and the ring list like an inflate result. The choice is a slider along the sweep
// (keyboard-reachable) or a click on a point of the plot; it starts at the best point (thickest tube, the
// least departure among equals).
import { alignRings, applyAlignment } from '../src/analyze/align.js';
import type { SweepConfiguration } from '../src/analyze/sweep.js';
import type { CompareResult } from '../src/model/result.js';
import type { Ring, Vec3 } from '../src/model/types.js';
import { fmt } from './resultPanel.js';
import { plotlyLibrary } from './solverAssets.js';

/** One point of the curve with the poses behind it. */
export interface SweepChoice {
  /** Departure from the symmetry (layout units). */
  epsilon: number;
  /** Tube radius of the configuration (layout units). */
  tube: number;
  status: string;
  rings: Ring[];
}

/** Tubes within this fraction of the thickest count as equally good (the solve's tolerance is 1e-9). */
const BEST_REL_TOL = 1e-9;

/**
 * The result's sweep points in order of departure, each with its configuration. The sweep reports one
 * configuration per point; when the comparison replaced the last point by its polished unconstrained optimum,
 * that point's poses are the broken optimum moved rigidly onto the symmetric one (as compare measures it).
 */
export function sweepChoices(result: CompareResult, configurations: readonly SweepConfiguration[]): SweepChoice[] {
  const out = result.sweep.map((p, i): SweepChoice => {
    const c = configurations[i];
    if (c && c.epsilon === p.epsilon && c.tube === p.tube) return { epsilon: p.epsilon, tube: p.tube, status: p.status, rings: c.rings.map(copy) };
    const a = alignRings(result.broken.rings, result.symmetric.rings);
    return { epsilon: p.epsilon, tube: p.tube, status: p.status, rings: result.broken.rings.map((r) => copy(applyAlignment(a, r))) };
  });
  return out.sort((a, b) => a.epsilon - b.epsilon);
}

/** Index of the thickest tube, the least departure among tubes equal to it within BEST_REL_TOL. */
export function bestChoice(choices: readonly SweepChoice[]): number {
  const top = Math.max(...choices.map((c) => c.tube));
  return Math.max(0, choices.findIndex((c) => c.tube >= top * (1 - BEST_REL_TOL)));
}

interface PlotlyLike {
  newPlot(el: HTMLElement, data: unknown[], layout: unknown, config: unknown): Promise<unknown>;
  restyle(el: HTMLElement, update: unknown, traces: number[]): Promise<unknown>;
}

/**
 * Draw the curve in `plot`, wire the slider (`slider`, with its read-out `text`) and call `show` with the
 * chosen point now and whenever the choice changes.
 */
export async function drawSweep(
  choices: SweepChoice[], units: string,
  els: { plot: HTMLElement; box: HTMLElement; slider: HTMLInputElement; text: HTMLElement },
  show: (choice: SweepChoice, index: number) => void,
): Promise<void> {
  const { plot, box, slider, text } = els;
  const initial = bestChoice(choices);
  slider.min = '0';
  slider.max = String(choices.length - 1);
  slider.step = '1';
  slider.value = String(initial);
  box.hidden = choices.length === 0;
  box.dataset['points'] = JSON.stringify(choices.map((c) => ({ epsilon: c.epsilon, tube: c.tube })));
  /** The plotting library once the curve is drawn (the marker of the chosen point follows the slider). */
  let plotted: PlotlyLike | null = null;
  const pick = (i: number): void => {
    const c = choices[i];
    if (!c) return;
    slider.value = String(i);
    const label = `point ${i + 1} of ${choices.length}: departure ${fmt(c.epsilon)} ${units}, tube ${fmt(c.tube)} ${units} (${c.status})` +
      (i === initial ? ', the best' : '');
    text.textContent = label;
    slider.setAttribute('aria-valuetext', label);
    box.dataset['index'] = String(i);
    box.dataset['epsilon'] = String(c.epsilon);
    box.dataset['tube'] = String(c.tube);
    show(c, i);
    if (plotted) void plotted.restyle(plot, { x: [[c.epsilon]], y: [[c.tube]] }, [1]);
  };
  slider.oninput = () => pick(Number(slider.value));
  pick(initial);
  // plotly is large: load it only when a comparison has a curve to draw.
  const Plotly = await plotlyLibrary<PlotlyLike>();
  const chosen = choices[Number(slider.value)]!;
  await Plotly.newPlot(plot, [
    { x: choices.map((p) => p.epsilon), y: choices.map((p) => p.tube), mode: 'lines+markers', name: 'tube', hovertemplate: 'departure %{x}<br>tube %{y}<extra>click to show</extra>' },
    { x: [chosen.epsilon], y: [chosen.tube], mode: 'markers', name: 'shown', marker: { size: 13, symbol: 'circle-open', line: { width: 2.5 }, color: '#c2474a' }, hoverinfo: 'skip' },
  ], {
    margin: { l: 55, r: 10, t: 25, b: 45 }, title: { text: 'Tube against departure from symmetry', font: { size: 13 } }, showlegend: false,
    xaxis: { title: { text: `allowed departure (${units})` } }, yaxis: { title: { text: `tube radius (${units})` } },
  }, { displaylogo: false, responsive: true });
  plotted = Plotly;
  (plot as HTMLElement & { on?: (ev: string, f: (e: { points?: { curveNumber: number; pointIndex: number }[] }) => void) => void })
    .on?.('plotly_click', (e) => {
      const p = e.points?.find((q) => q.curveNumber === 0);
      if (p) pick(p.pointIndex);
    });
}

function copy(r: Pick<Ring, 'name' | 'center' | 'normal' | 'radius'>): Ring {
  return { name: r.name, center: [...r.center] as Vec3, normal: [...r.normal] as Vec3, radius: r.radius };
}
