// `thickring measure LAYOUT [--json]`: the tube a layout allows as it stands, pair by pair.
import type { Command } from 'commander';
import { measureLayout, type MeasureResult } from '../src/analyze/measure.js';
import { displayName as dn } from '../src/model/displayName.js';
import { textTable } from '../reports/format.js';
import { emit, type Io } from './io.js';
import { loadLayoutFile } from './layoutFile.js';

export function register(program: Command, io: Io): void {
  program
    .command('measure')
    .description('Measure a layout as it stands: core distances, closest pairs, linking numbers and the largest common tube radius.')
    .argument('<layout>', 'layout JSON file (format thickring-layout/1)')
    .option('--json', 'print one JSON object instead of text')
    .action((file: string, opts: { json?: boolean }) => {
      const result = measureLayout(loadLayoutFile(file));
      emit(io, opts.json === true, result, () => formatMeasure(result, file));
    });
}

/** Human-readable report; every length carries the layout's units. */
export function formatMeasure(m: MeasureResult, file: string): string {
  const u = m.units ?? 'layout units';
  const L = (x: number): string => `${num(x)} ${u}`;
  const lines: string[] = [];
  lines.push(`Layout ${file}: ${m.rings.length} ring${m.rings.length === 1 ? '' : 's'}, lengths in ${u}`);
  lines.push(`Largest common tube radius: ${L(m.tube)} (wire diameter ${L(2 * m.tube)}; tube / smallest core radius ${num(m.tubeOverCore)}, dimensionless)`);
  const lim = [
    ...m.limitedBy.rings.map((n) => `ring ${dn(n)} (tube = core radius)`),
    ...m.limitedBy.pairs.map((p) => `pair ${dn(p.a)}-${dn(p.b)}${p.shift ? ` shifted [${p.shift.join(', ')}]` : ''} (tubes touch)`),
  ];
  lines.push(`Limited by: ${lim.join('; ')}`);
  lines.push(`Aspect ratio (inner diameter / wire diameter), smallest over the rings, ring ${m.aspectRatioRing}: ${num(m.aspectRatio)} (dimensionless)`);
  if (m.given) {
    lines.push(`Largest tube given in the layout: ${L(m.given.tube)}, ${m.given.fits ? 'fits' : 'does NOT fit'} (allowed ${L(m.tube)})`);
  }
  lines.push('');
  lines.push('Rings');
  lines.push(textTable(
    ['name', `centre (${u})`, 'normal (unit)', `core R (${u})`, `tube r (${u})`, 'ratio (dimensionless)', `ring allows tube (${u})`, 'aspect ratio (dimensionless)'],
    m.rings.map((r) => [
      dn(r.name), vec(r.center), vec(r.normal), num(r.radius), num(r.tube), num(r.tubeRatio), num(r.tubeLimit), num(r.aspectRatio),
    ]),
  ));
  if (m.pairs.length > 0) {
    lines.push('');
    lines.push('Pairs');
    lines.push(textTable(
      ['pair', `core distance (${u})`, 'contacts', 'linking', `allows tube (${u})`, 'note'],
      m.pairs.map((p) => [
        `${dn(p.nameA)}-${dn(p.nameB)}${p.shift ? ` [${p.shift.join(',')}]` : ''}`,
        num(p.distance),
        String(p.contacts.length),
        p.linking > 0 ? '+1' : String(p.linking),
        num(p.tubeLimit),
        p.continuum ? `continuum (${p.continuum.kind})` : '',
      ]),
    ));
  }
  lines.push('');
  lines.push(`Linked pieces: ${m.components.length} (${m.components.map((c) => c.map(dn).join(' ')).join(' | ')})`);
  for (const n of m.notes) lines.push(`Note: ${n}`);
  for (const c of m.cautions) lines.push(`Caution: ${c}`);
  return lines.join('\n');
}

function num(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  return String(Number(x.toPrecision(6)));
}

function vec(v: readonly number[]): string {
  return v.map(num).join(', ');
}
