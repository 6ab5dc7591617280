// Plain-text terminal summary of a result (inflate or compare), same figures as the HTML report.
import { displayName } from '../src/model/displayName.js';
import type { WeaveWeight } from '../src/model/periodicMaterials.js';
import { optimalityOf, optimalityText, type CompareResult, type SolveResult } from '../src/model/result.js';
import { DIMENSIONLESS, lengthUnit, num, percent, signed, vec, withUnit } from './format.js';
import { isCompareResult, symmetryLabel } from './kind.js';

export function formatSummary(result: SolveResult | CompareResult): string {
  return isCompareResult(result) ? compareSummary(result) : solveSummary(result);
}

/** The figures of one optimum, as label / value / unit rows. */
export function figureRows(r: SolveResult): [string, string, string][] {
  const unit = lengthUnit(r);
  const okStarts = r.starts.filter((s) => s.status === 'optimal').length;
  return [
    ['status', r.status, ''],
    ['optimality', optimalityText(optimalityOf(r), r.symmetry), ''],
    ['tube radius r', num(r.tube), unit],
    ['tube / smallest core radius', num(r.tubeOverCore), DIMENSIONLESS],
    ['aspect ratio (inner diam. / wire diam.)', num(r.aspectRatio, 4) + (r.aspectRatioRing ? ` (smallest, ring ${r.aspectRatioRing})` : ''), DIMENSIONLESS],
    ['packing bound on r', r.bound ? num(r.bound.tube) : 'none', r.bound ? unit : ''],
    ['gap to bound', r.bound ? percent(r.bound.gap) : 'n/a', ''],
    ['certificate balance residual', num(r.certificate.balanceResidual, 3), DIMENSIONLESS],
    ['max constraint violation / r', num(r.certificate.maxViolation, 3), DIMENSIONLESS],
    ['active struts', r.symmetry && r.contacts.length !== r.certificate.activeStruts
      ? `${r.contacts.length} (${r.certificate.activeStruts} up to ${symmetryLabel(r.symmetry)} symmetry)` : String(r.certificate.activeStruts), 'count'],
    ['independent check', r.verification.ok ? 'passed' : 'FAILED', ''],
    ['min clearance / r (independent check)', num(r.verification.minClearance, 3), DIMENSIONLESS],
    ['starts (optimal / all)', `${okStarts} / ${r.starts.length}`, 'count'],
    ['elapsed', num(r.elapsedSeconds, 3), 'seconds'],
    ...weaveRows(r),
  ];
}

interface WeaveFigures {
  kind: string;
  cellRings: number;
  periodLength?: number;
  cellArea?: number;
  ringsPerUnitLength?: number;
  ringsPerUnitArea?: number;
  weight?: WeaveWeight | null;
  repeats?: number[];
}

/** A weave result: lattice, density of rings, the minimum aspect ratio and the weight, as figure rows. */
export function weaveRows(r: SolveResult): [string, string, string][] {
  const p = (r as { periodic?: WeaveFigures }).periodic;
  if (!p || !r.lattice) return [];
  const unit = lengthUnit(r);
  const per = unit === 'layout units' ? 'layout unit' : unit;
  const rows: [string, string, string][] = [
    ['weave', `${p.kind}, ${p.cellRings} rings per cell${p.repeats ? ` (listed as a block of ${p.repeats.join(' x ')} cells)` : ''}`, ''],
    ['minimum aspect ratio of the weave', num(r.aspectRatio, 4), DIMENSIONLESS],
  ];
  r.lattice.vectors.forEach((v, k) => {
    const cells = p.repeats?.[k] ?? 1;
    rows.push([`lattice vector ${k + 1} (of one cell)`, `${vec(v.map((x) => x / cells))}, length ${num(Math.hypot(...v) / cells)}`, unit]);
  });
  if (p.ringsPerUnitLength !== undefined) rows.push(['rings per length', num(p.ringsPerUnitLength, 4), `per ${per}`]);
  if (p.ringsPerUnitArea !== undefined) rows.push(['rings per area', num(p.ringsPerUnitArea, 4), `per square ${per}`]);
  if (p.weight) {
    const w = weightFigure(p.weight);
    rows.push(['weight', `${w.value} (${num(p.weight.rings, 4)} rings per ${p.weight.per}, wire ${num(p.weight.wireDiameterMm, 4)} mm)`, w.unit]);
  }
  return rows;
}

/** Weight in units a maker uses: g/m for chain, kg/m² for sheet. */
export function weightFigure(w: Pick<WeaveWeight, 'grams' | 'per'>): { value: string; unit: string } {
  return w.per === 'metre' ? { value: num(w.grams, 4), unit: 'g/m' } : { value: num(w.grams / 1000, 4), unit: 'kg/m²' };
}

function solveSummary(r: SolveResult): string {
  const lines = [
    `thickring ${r.command} ${r.spec}: ${r.rings.length} rings, symmetry ${symmetryLabel(r.symmetry)}`,
    table(figureRows(r).map(([l, v, u]) => [l, v, u])),
  ];
  lines.push(...ringLines(r), ...noteLines(r));
  return lines.join('\n');
}

function compareSummary(c: CompareResult): string {
  const unit = lengthUnit(c);
  const s = figureRows(c.symmetric), b = figureRows(c.broken);
  const rows: string[][] = [['', 'symmetric', 'broken', 'unit']];
  s.forEach(([label, sv, u], i) => rows.push([label, sv, b[i]![1], u || b[i]![2]]));
  const lines = [
    `thickring compare ${c.spec}: symmetric (${symmetryLabel(c.symmetric.symmetry)}) vs symmetry broken, ${c.rings.length} rings`,
    table(rows),
    '',
    `gain from breaking the symmetry: ${signed(c.gain, unit)}` +
      (Number.isFinite(c.gainPercent) ? ` (${c.gainPercent >= 0 ? '+' : ''}${num(c.gainPercent, 3)} %)` : ''),
  ];
  if (c.changes.length > 0) {
    lines.push('', 'per-ring change, broken vs symmetric optimum (after best rigid alignment):');
    lines.push(table(c.changes.map((ch) => [
      `  ring ${displayName(ch.name)}`, `moved ${withUnit(ch.displacement, unit, 4)}`, `tilted ${withUnit(ch.tiltDegrees, 'degrees', 3)}`,
    ])));
  }
  if (c.sweep.length > 0) {
    lines.push('', `symmetry-breaking curve (allowed departure epsilon -> thickest tube, ${unit}):`);
    lines.push(table(c.sweep.map((p) => [`  epsilon ${num(p.epsilon, 4)}`, `tube ${num(p.tube)}`, p.status])));
  }
  lines.push(...noteLines(c.symmetric, 'symmetric: '), ...noteLines(c.broken, 'broken: '));
  return lines.join('\n');
}

function ringLines(r: SolveResult): string[] {
  const unit = lengthUnit(r);
  const out = ['', `rings (${unit}; aspect ratio dimensionless):`];
  out.push(table(r.rings.map((g) => [
    `  ${displayName(g.name)}`, `R ${num(g.radius)}`, `r ${num(g.tube)}`, `AR ${num(g.aspectRatio, 4)}`,
  ])));
  return out;
}

function noteLines(r: SolveResult, prefix = ''): string[] {
  const out: string[] = [];
  if (r.certificate.note) out.push(`${prefix}certificate: ${r.certificate.note}`);
  for (const m of r.verification.messages) out.push(`${prefix}check: ${m}`);
  return out.length ? ['', ...out] : [];
}

// Left-aligned text columns, two spaces apart; empty trailing cells dropped.
function table(rows: string[][]): string {
  const widths: number[] = [];
  for (const row of rows) row.forEach((c, i) => { widths[i] = Math.max(widths[i] ?? 0, c.length); });
  return rows.map((row) => row.map((c, i) => (i === row.length - 1 ? c : c.padEnd(widths[i]!))).join('  ').trimEnd())
    .join('\n');
}
