// The result panel: status, tube, certificate, bound and gap, worded as the CLI's inflate text.
import { BOUND_ATTAINED, optimalityOf, optimalityText, type SolveResult } from '../src/model/result.js';

export function fmt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  const a = Math.abs(x);
  return a >= 1e-3 && a < 1e6 ? String(Number(x.toPrecision(6))) : x.toExponential(3);
}

export function renderResult(
  host: HTMLElement, r: SolveResult, known: { tubeOverCore: number; formula: string; source: string } | null, units: string,
): void {
  const c = r.certificate;
  const rows: [string, string, string?][] = [
    ['Status', `${r.status}; ${optimalityText(optimalityOf(r))}`, 'status'],
    ['Tube radius', `${fmt(r.tube)} ${units} (wire diameter ${fmt(2 * r.tube)} ${units})`, 'tube'],
    ['Tube / core', `${fmt(r.tubeOverCore)} (dimensionless)`, 'tube-over-core'],
    ['Aspect ratio', `${fmt(r.aspectRatio)} (inner diameter / wire diameter, dimensionless, ring ${r.rings.reduce((m, x) => (x.aspectRatio < m.aspectRatio ? x : m), r.rings[0]!).name})`],
    ['Symmetry', r.symmetry ? `${r.symmetry.type}:${r.symmetry.order} imposed` : 'none imposed'],
    ['Certificate', `${c.method}, ${c.certified ? 'certified' : 'NOT certified'}; balance residual ${fmt(c.balanceResidual)}, max violation ${fmt(c.maxViolation)} of the tube (both dimensionless); ${c.activeStruts} active constraint${c.activeStruts === 1 ? '' : 's'} weighed`, 'certificate'],
  ];
  if (r.bound) {
    rows.push(['Upper bound', `${fmt(r.bound.tube)} ${units} (circle packing, ring ${r.rings[r.bound.ring]?.name ?? r.bound.ring} with ${r.bound.through} through it)`, 'bound']);
    rows.push(['Gap', `(bound − tube) / bound = ${fmt(r.bound.gap)} (dimensionless)${r.verification.ok && r.bound.gap <= BOUND_ATTAINED ? ': bound attained, global optimum' : ''}`, 'gap']);
  }
  rows.push(['Independent check', r.verification.ok ? 'passed' : `FAILED: ${r.verification.messages[0] ?? ''}`]);
  if (known) rows.push(['Known optimum', `tube / core = ${known.formula} = ${fmt(known.tubeOverCore)} (dimensionless); ${known.source}`]);
  rows.push(['Time', `${fmt(r.elapsedSeconds)} s`]);
  host.innerHTML = '';
  for (const [k, v, id] of rows) {
    const dt = document.createElement('dt');
    dt.textContent = k;
    const dd = document.createElement('dd');
    dd.textContent = v;
    if (id) dd.dataset['key'] = id;
    host.append(dt, dd);
  }
  if (r.tubeOverCore !== undefined) host.dataset['tubeOverCore'] = String(r.tubeOverCore);
}
