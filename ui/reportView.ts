// The report's 3D view: the ui page's renderer (view3d.ts, three.js) built as one classic script that the
// standalone HTML report inlines. It replaces plotly's WebGL scene, which held the browser for tens of
// seconds under software rendering; plotly still draws the report's 2D plots.
import { View3d } from './view3d.js';
import type { Vec3 } from '../src/model/types.js';

export interface ReportViewSpec {
  rings: { name: string; center: Vec3; normal: Vec3; radius: number; tube: number }[];
  struts: { onA: Vec3; onB: Vec3; force: number }[];
  units: string;
}

/** Draw the rings into `host` (see-through tubes by default, a button toggles solid); resolves when drawn. */
export function mount(host: HTMLElement, spec: ReportViewSpec): Promise<void> {
  host.classList.add('three-view');
  host.style.position = 'relative';
  const frame = document.createElement('div');
  frame.style.cssText = 'position:absolute;inset:0';
  host.appendChild(frame);
  const view = new View3d(frame, { onDrag() {}, onDragEnd() {} });
  view.setSeeThrough(true);
  const fmax = Math.max(0, ...spec.struts.map((s) => (Number.isFinite(s.force) ? s.force : 0)));
  view.show(spec.rings, spec.rings.map((r) => r.tube), spec.struts.map((s) => ({ ...s, force: fmax > 0 ? s.force / fmax : 0 })), true);
  const bar = document.createElement('div');
  bar.style.cssText = 'position:absolute;left:8px;top:8px;display:flex;gap:6px;align-items:center;font:12px system-ui,sans-serif';
  const toggle = document.createElement('button');
  toggle.type = 'button';
  toggle.textContent = 'solid tubes';
  let glass = true;
  toggle.addEventListener('click', () => {
    glass = !glass;
    view.setSeeThrough(glass);
    toggle.textContent = glass ? 'solid tubes' : 'see-through tubes';
  });
  const note = document.createElement('span');
  note.textContent = `drag to turn, right-drag to pan, wheel to zoom; lengths in ${spec.units}` +
    (spec.struts.length ? '; struts from pale (no force) to dark red (largest force, dimensionless)' : '');
  note.style.cssText = 'background:rgba(255,255,255,0.85);padding:2px 4px';
  bar.append(toggle, note);
  host.appendChild(bar);
  return new Promise((ok) => requestAnimationFrame(() => requestAnimationFrame(() => ok())));
}
