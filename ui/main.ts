// The `thickring ui` page: open an arrangement, move rings by hand with a live check, inflate it with the
// library's solver in Web Workers, compare symmetric and broken optima, and download meshes.
import { compare } from '../src/analyze/compare.js';
import type { SweepConfiguration } from '../src/analyze/sweep.js';
import { ringDistance } from '../src/kernel/index.js';
import { catalogEntries } from '../src/model/catalog.js';
import type { SolveResult, CompareResult } from '../src/model/result.js';
import type { Ring, Vec3 } from '../src/model/types.js';
import { runMultistart } from '../src/optimize/run/multistart.js';
import type { InflateProblem } from '../src/optimize/run/problem.js';
import { stopPool, defaultWorkers } from './browserPool.js';
import { checkPose, openCatalog, openFile, type Design, type PoseCheck } from './model.js';
import { makeFiles, showCautions } from './make.js';
import { drawSweep, sweepChoices, type SweepChoice } from './sweepPick.js';
import { renderResult, fmt } from './resultPanel.js';
import { View3d, type ViewStrut } from './view3d.js';

const $ = <T extends HTMLElement>(id: string): T => document.getElementById(id) as T;
/** Display tube before any solve: thin enough to show the cores, as a fraction of the smallest core radius. */
const PREVIEW_TUBE_REL = 0.06;
const SEED = 0;
const TOL = 1e-9;
/** A pair of a shown sweep point touches when its gap is within this fraction of the tube (the solve's tolerance is 1e-9). */
const TOUCH_REL = 1e-6;

let design: Design | null = null;
let selected = 0;
/** Pose of the selected ring when the drag began (restored if the move is refused). */
let dragStart: Ring | null = null;
let lastCheck: PoseCheck | null = null;
/** What the linking matrix on screen was drawn from (names, linking, changed pairs). */
let linkingShown = '';
let running = false;
/** Tube of the sweep point on show (layout units), when the rings are a chosen point of a comparison's curve. */
let pointTube: number | null = null;

const view = new View3d($('view'), {
  onDrag(index, center, normal) {
    if (!design) return;
    design.rings[index] = { ...design.rings[index]!, center, normal };
    live();
    fillRow(index);
  },
  onDragEnd(index) {
    if (!design || !dragStart) return;
    if (lastCheck && !lastCheck.ok) {
      design.rings[index] = dragStart;
      view.setPose(index, dragStart.center, dragStart.normal);
      say(refusal(lastCheck));
      live();
      fillRow(index);
    } else {
      edited();
    }
    dragStart = null;
  },
});
view.renderer.domElement.addEventListener('pointerdown', () => {
  if (design) dragStart = copyRing(design.rings[selected]!);
});

// ---- opening -----------------------------------------------------------------------------------

function say(text: string): void {
  $('message').textContent = text;
}

function load(d: Design): void {
  design = d;
  selected = 0;
  say('');
  $('spec').textContent = `${d.spec}: ${d.rings.length} rings`;
  document.querySelectorAll<HTMLElement>('.units').forEach((e) => (e.textContent = unitsOf()));
  $('symmetry-name').textContent = d.symmetry ? `(${d.symmetry.type}:${d.symmetry.order})` : '(none in this layout)';
  ($('symmetry') as HTMLInputElement).disabled = !d.symmetry;
  buildRows();
  $('result').innerHTML = '';
  $('compare-plot').innerHTML = '';
  $('sweep-pick').hidden = true;
  pointTube = null;
  if (d.result) renderResult($('result'), d.result, d.known, unitsOf());
  view.show(d.rings, tubes(), struts(), true);
  view.select(selected);
  live();
  document.body.dataset['loaded'] = d.spec;
}

function tryOpen(f: () => Design): void {
  try {
    load(f());
  } catch (e) {
    say(`thickring: ${e instanceof Error ? e.message : String(e)}`);
  }
}

async function openFromFile(file: File): Promise<void> {
  const text = await file.text();
  tryOpen(() => openFile(file.name, text));
}

const select = $('catalog') as HTMLSelectElement;
for (const e of catalogEntries()) {
  const specs = e.spec.includes(':') ? [2, 3, 4, 5, 6].map((n) => e.spec.replace(/[NK]$/, String(n))) : [e.spec];
  for (const s of specs) {
    if ((e.family === 'necklace' && s.endsWith(':2'))) continue;
    const o = document.createElement('option');
    o.value = s;
    o.textContent = `${s}: ${e.description}`;
    select.appendChild(o);
  }
}
$('open-form').addEventListener('submit', (ev) => {
  ev.preventDefault();
  tryOpen(() => openCatalog(select.value));
});
$('file').addEventListener('change', (ev) => {
  const f = (ev.target as HTMLInputElement).files?.[0];
  if (f) void openFromFile(f);
});
const viewEl = $('view');
viewEl.addEventListener('dragover', (ev) => { ev.preventDefault(); viewEl.classList.add('drag-over'); });
viewEl.addEventListener('dragleave', () => viewEl.classList.remove('drag-over'));
viewEl.addEventListener('drop', (ev) => {
  ev.preventDefault();
  viewEl.classList.remove('drag-over');
  const f = ev.dataTransfer?.files[0];
  if (f) void openFromFile(f);
});

// ---- ring list and live check ------------------------------------------------------------------

function buildRows(): void {
  const body = $('rings').querySelector('tbody')!;
  body.innerHTML = '';
  design!.rings.forEach((r, i) => {
    const tr = document.createElement('tr');
    tr.dataset['ring'] = String(i);
    const name = document.createElement('td');
    const b = document.createElement('button');
    b.textContent = r.name;
    b.title = `Select ring ${r.name} for the drag handle`;
    b.addEventListener('click', () => choose(i));
    name.appendChild(b);
    tr.appendChild(name);
    for (const [key, count] of [['center', 3], ['normal', 3], ['radius', 1]] as const) {
      const td = document.createElement('td');
      for (let k = 0; k < count; k++) {
        const inp = document.createElement('input');
        inp.type = 'number';
        inp.step = key === 'radius' ? '0.05' : '0.05';
        inp.dataset['field'] = key;
        inp.dataset['k'] = String(k);
        inp.setAttribute('aria-label', `ring ${r.name} ${key}${count > 1 ? ' ' + 'xyz'[k] : ''} (${key === 'normal' ? 'direction, dimensionless' : unitsOf()})`);
        inp.addEventListener('change', () => editRow(i));
        td.appendChild(inp);
      }
      tr.appendChild(td);
    }
    body.appendChild(tr);
    fillRow(i);
  });
  markRows();
}

function fillRow(i: number): void {
  const r = design!.rings[i]!;
  const tr = $('rings').querySelector(`tr[data-ring="${i}"]`);
  if (!tr) return;
  tr.querySelectorAll<HTMLInputElement>('input').forEach((inp) => {
    const k = Number(inp.dataset['k']);
    const v = inp.dataset['field'] === 'radius' ? r.radius : inp.dataset['field'] === 'center' ? r.center[k]! : r.normal[k]!;
    inp.value = String(Number(v.toFixed(6)));
  });
}

function editRow(i: number): void {
  if (!design) return;
  const tr = $('rings').querySelector(`tr[data-ring="${i}"]`)!;
  const before = copyRing(design.rings[i]!);
  const next = copyRing(before);
  for (const inp of tr.querySelectorAll<HTMLInputElement>('input')) {
    const v = Number(inp.value);
    const field = inp.dataset['field']!;
    const k = Number(inp.dataset['k']);
    if (inp.value.trim() === '' || !Number.isFinite(v)) {
      say(`ring ${before.name}: ${field} must be a number; type a value such as 0.5`);
      fillRow(i);
      return;
    }
    if (field === 'radius') next.radius = v;
    else next[field as 'center' | 'normal'][k] = v;
  }
  if (!(next.radius > 0)) {
    say(`ring ${before.name}: radius ${next.radius} must be > 0; give a positive core radius`);
    fillRow(i);
    return;
  }
  if (Math.hypot(...next.normal) === 0) {
    say(`ring ${before.name}: normal [0, 0, 0] has no direction; give a non-zero normal such as 0, 0, 1`);
    fillRow(i);
    return;
  }
  design.rings[i] = next;
  const check = checkPose(design.rings, tubes(), design.linking);
  if (!check.ok) {
    design.rings[i] = before;
    fillRow(i);
    say(refusal(check));
    live();
    return;
  }
  if (next.radius !== before.radius) view.show(design.rings, tubes(), [], false);
  else view.setPose(i, next.center, next.normal);
  edited();
}

/** After an accepted change: the old result no longer describes the rings. */
function edited(): void {
  if (!design) return;
  say('');
  if (pointTube !== null) {
    pointTube = null;
    view.show(design.rings, tubes(), legend(false), false);
  }
  if (design.result) {
    design.result = null;
    $('result').innerHTML = '<dt>Result</dt><dd>cleared: the rings were moved (press Inflate)</dd>';
    view.show(design.rings, tubes(), [], false);
  }
  live();
}

function choose(i: number): void {
  selected = i;
  view.select(i);
  markRows();
}

function live(): void {
  if (!design) return;
  const check = checkPose(design.rings, tubes(), design.linking);
  lastCheck = check;
  const names = design.rings.map((r) => r.name);
  const c = $('clearance');
  c.className = check.ok ? '' : 'bad';
  c.textContent = `Least clearance ${fmt(check.leastClearance)} ${unitsOf()} (rings ${names[check.pair[0]]}–${names[check.pair[1]]}, ` +
    `core distance less both tubes)` + (check.ok ? '' : ` — ${refusal(check)}`);
  c.dataset['clearance'] = String(check.leastClearance);
  c.dataset['ok'] = String(check.ok);
  // A drag step seldom changes the linking: redraw the matrix only when what it shows changed.
  const shown = JSON.stringify([names, check.linking, check.changed]);
  if (shown !== linkingShown) {
    linkingShown = shown;
    drawLinking(names, check);
  }
  view.setBad(!check.ok);
  markRows();
}

function drawLinking(names: string[], check: PoseCheck): void {
  const t = document.createElement('table');
  t.setAttribute('aria-label', 'Linking matrix (linking numbers, dimensionless)');
  const head = document.createElement('tr');
  head.appendChild(document.createElement('th'));
  for (const n of names) { const th = document.createElement('th'); th.textContent = n; head.appendChild(th); }
  t.appendChild(head);
  check.linking.forEach((row, i) => {
    const tr = document.createElement('tr');
    const th = document.createElement('th');
    th.textContent = names[i]!;
    tr.appendChild(th);
    row.forEach((x, j) => {
      const td = document.createElement('td');
      td.textContent = i === j ? '·' : String(x);
      if (check.changed.some(([a, b]) => (a === i && b === j) || (a === j && b === i))) td.className = 'changed';
      tr.appendChild(td);
    });
    t.appendChild(tr);
  });
  const host = $('linking');
  host.innerHTML = '<p>Linking matrix (linking numbers, dimensionless):</p>';
  host.appendChild(t);
}

function markRows(): void {
  $('rings').querySelectorAll<HTMLTableRowElement>('tbody tr').forEach((tr) => {
    const i = Number(tr.dataset['ring']);
    tr.classList.toggle('selected', i === selected);
    tr.classList.toggle('bad', i === selected && lastCheck !== null && !lastCheck.ok);
  });
}

function refusal(check: PoseCheck): string {
  const names = design!.rings.map((r) => r.name);
  if (check.intersecting.length) {
    const [a, b] = check.intersecting[0]!;
    return `Move refused: rings ${names[a]} and ${names[b]} would intersect; move the ring back out of its partner`;
  }
  const [a, b] = check.changed[0]!;
  return `Move refused: rings ${names[a]} and ${names[b]} would ${design!.linking[a]![b] ? 'come unlinked' : 'become linked'}; a ring cannot pass through another`;
}

// ---- inflate and compare -----------------------------------------------------------------------

function problem(): InflateProblem {
  const d = design!;
  const sym = ($('symmetry') as HTMLInputElement).checked ? d.symmetry : null;
  return { rings: d.rings.map(copyRing), tubeRatios: d.tubeRatios.slice(), linking: d.linking.map((r) => r.slice()), symmetry: sym };
}

function starts(): number {
  const n = Math.round(Number(($('starts') as HTMLInputElement).value));
  return Number.isFinite(n) ? Math.max(1, Math.min(16, n)) : 2;
}

async function solving(label: string, work: () => Promise<void>): Promise<void> {
  if (!design || running) return;
  running = true;
  say('');
  ($('stop') as HTMLButtonElement).disabled = false;
  ($('inflate') as HTMLButtonElement).disabled = true;
  ($('compare') as HTMLButtonElement).disabled = true;
  $('progress').textContent = `${label}: starting the workers…`;
  document.body.dataset['solving'] = 'yes';
  const t0 = performance.now();
  try {
    await work();
    $('progress').textContent = `${label}: done in ${fmt((performance.now() - t0) / 1000)} s`;
  } catch (e) {
    say(`thickring: ${e instanceof Error ? e.message : String(e)}`);
    $('progress').textContent = `${label}: failed`;
  } finally {
    running = false;
    ($('stop') as HTMLButtonElement).disabled = true;
    ($('inflate') as HTMLButtonElement).disabled = false;
    ($('compare') as HTMLButtonElement).disabled = false;
    delete document.body.dataset['solving'];
  }
}

let stopped = false;
$('stop').addEventListener('click', () => {
  stopped = true;
  stopPool();
  $('progress').textContent = 'Stopped.';
});

$('inflate').addEventListener('click', () => void solving('Inflate', async () => {
  stopped = false;
  const d = design!;
  const p = problem();
  const n = starts();
  let finished = false;
  const result = await runMultistart(p, {
    starts: n, workers: defaultWorkers(n), seed: SEED, tol: TOL, spec: d.spec, command: 'inflate', units: d.units,
    onIteration: (e) => {
      // Heartbeats travel on their own channel and may land after the result.
      if (stopped || finished) return;
      $('progress').textContent = `Inflate: start ${e.start + 1} of ${n}, iteration ${e.iteration}, tube ${fmt(e.tube)} ${unitsOf()}`;
      view.setTubes(d.tubeRatios.map((w) => w * e.tube));
    },
    onProgress: (e) => {
      if (stopped) return;
      $('progress').textContent = `Inflate: ${e.done} of ${e.total} starts done; best tube ${Number.isNaN(e.bestTube) ? '—' : fmt(e.bestTube)} ${unitsOf()}`;
    },
  });
  finished = true;
  if (stopped) {
    view.setTubes(tubes());
    throw new Error('stopped before the solve finished; the rings are as they were');
  }
  if (design !== d) return;
  pointTube = null;
  d.result = result;
  d.rings = result.rings.map((r) => ({ name: r.name, center: r.center, normal: r.normal, radius: r.radius }));
  buildRows();
  renderResult($('result'), result, d.known, unitsOf());
  view.show(d.rings, tubes(), struts(), false);
  view.select(selected);
  live();
}));

$('compare').addEventListener('click', () => void solving('Compare', async () => {
  stopped = false;
  const d = design!;
  if (!d.symmetry) throw new Error(`${d.spec} has no symmetry to compare against: open a catalogue entry or a layout with a symmetry section`);
  const n = starts();
  const rings = d.rings.map(copyRing);
  const resolved = {
    spec: d.spec, source: 'file' as const, layout: { format: 'thickring-layout/1' as const, rings, symmetry: d.symmetry },
    linking: d.linking.map((r) => r.slice()), tubeRatios: d.tubeRatios.slice(), notes: [], catalog: null,
  };
  let configurations: SweepConfiguration[] = [];
  const result: CompareResult = await compare(resolved, {
    symmetry: d.symmetry, tubeRatios: d.tubeRatios, starts: n, workers: defaultWorkers(n), seed: SEED, tol: TOL, sweepPoints: 4,
    onProgress: (e) => {
      if (!stopped) $('progress').textContent = `Compare: ${e.phase} ${e.done} of ${e.total}; best tube ${fmt(e.bestTube)} ${unitsOf()}`;
    },
    onSweep: (out) => { configurations = out.configurations; },
  });
  if (stopped) throw new Error('stopped before the comparison finished');
  if (design !== d) return;
  renderResult($('result'), result, d.known, unitsOf());
  $('result').insertAdjacentHTML('beforeend',
    `<dt>Symmetric tube</dt><dd>${fmt(result.symmetric.tube)} ${unitsOf()}</dd><dt>Broken tube</dt><dd>${fmt(result.broken.tube)} ${unitsOf()}</dd>` +
    `<dt>Gain</dt><dd>${fmt(result.gainPercent)} % (broken over symmetric)</dd>`);
  const choices = sweepChoices(result, configurations);
  if (choices.length === 0) return;
  await drawSweep(choices, unitsOf(), {
    plot: $('compare-plot'), box: $('sweep-pick'), slider: $('sweep-point') as HTMLInputElement, text: $('sweep-point-text'),
  }, (c) => { if (design === d && !running) showPoint(c); });
  if (design === d) showPoint(choices[Number(($('sweep-point') as HTMLInputElement).value)]!);
}));

/** Show a point of the comparison's curve like an inflate result: its poses in the view and the ring list. */
function showPoint(c: SweepChoice): void {
  const d = design!;
  d.rings = c.rings.map(copyRing);
  d.result = null;
  pointTube = c.tube;
  buildRows();
  view.show(d.rings, tubes(), touching(d.rings, tubes()), false);
  view.select(selected);
  live();
}

/** Pairs that touch (gap within TOUCH_REL of the tube), drawn as struts of unknown force. */
function touching(rings: Ring[], tube: number[]): ViewStrut[] {
  const out: ViewStrut[] = [];
  for (let i = 0; i < rings.length; i++) {
    for (let j = i + 1; j < rings.length; j++) {
      const r = ringDistance(rings[i]!, rings[j]!);
      const gap = r.distance - tube[i]! - tube[j]!;
      if (gap > TOUCH_REL * Math.max(tube[i]!, tube[j]!)) continue;
      for (const c of r.contacts) {
        if (c.distance - tube[i]! - tube[j]! <= TOUCH_REL * Math.max(tube[i]!, tube[j]!)) out.push({ onA: c.onA, onB: c.onB, force: null });
      }
    }
  }
  $('legend').innerHTML = out.length ? 'Contacts of the chosen sweep point (forces not computed)' : '';
  return out;
}

// ---- make it -----------------------------------------------------------------------------------

showCautions($('cautions'));
for (const [id, kind] of [['dl-stl', 'stl'], ['dl-3mf', '3mf'], ['dl-json', 'json']] as const) {
  $(id).addEventListener('click', () => {
    if (!design?.result) {
      say('Make it needs a result: press Inflate first (or open a result file)');
      return;
    }
    try {
      const clearanceText = ($('clearance-mm') as HTMLInputElement).value.trim();
      const note = makeFiles(design.result, kind, {
        process: ($('process') as HTMLSelectElement).value,
        innerDiameter: Number(($('size') as HTMLInputElement).value),
        clearance: clearanceText === '' ? undefined : Number(clearanceText),
      });
      $('make-note').textContent = note;
      say('');
    } catch (e) {
      say(`thickring: ${e instanceof Error ? e.message : String(e)}`);
    }
  });
}

// ---- view options and start --------------------------------------------------------------------

document.querySelectorAll<HTMLInputElement>('input[name="mode"]').forEach((r) =>
  r.addEventListener('change', () => view.setMode(r.value as 'translate' | 'rotate')));
$('see-through').addEventListener('change', (ev) => view.setSeeThrough((ev.target as HTMLInputElement).checked));

function unitsOf(): string {
  return design?.units ?? 'layout units';
}

function tubes(): number[] {
  const d = design!;
  if (d.result) return d.result.rings.map((r) => r.tube);
  if (pointTube !== null) return d.tubeRatios.map((w) => w * pointTube!);
  const base = PREVIEW_TUBE_REL * Math.min(...d.rings.map((r) => r.radius));
  return d.tubeRatios.map((w) => w * base);
}

function struts(): ViewStrut[] {
  const r: SolveResult | null = design?.result ?? null;
  if (!r) return legend(false);
  const max = Math.max(1e-300, ...r.contacts.map((c) => c.force));
  legend(r.contacts.length > 0);
  return r.contacts.map((c) => ({ onA: c.onA, onB: c.onB, force: c.force / max }));
}

function legend(on: boolean): ViewStrut[] {
  $('legend').innerHTML = on ? 'Strut force (share of the largest, dimensionless)<div class="bar"></div><span>0</span><span style="float:right">1</span>' : '';
  return [];
}

function copyRing(r: Ring): Ring {
  return { name: r.name, center: [...r.center] as Vec3, normal: [...r.normal] as Vec3, radius: r.radius };
}

// Preloaded arrangement (thickring ui SPEC|LAYOUT|RESULT), else the Hopf link.
const pre = document.getElementById('preload');
const preData = pre?.textContent ? (JSON.parse(pre.textContent) as { kind: 'spec'; spec: string } | { kind: 'file'; name: string; text: string }) : null;
if (preData?.kind === 'file') tryOpen(() => openFile(preData.name, preData.text));
else tryOpen(() => openCatalog(preData?.kind === 'spec' ? preData.spec : 'hopf'));
const opened = design as Design | null;
if (opened) select.value = opened.spec;
document.body.dataset['ready'] = 'yes';
