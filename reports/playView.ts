// A play analysis (src/analyze/play.ts) reduced to what the report shows: the verdict, the counts,
// and each ring's smallest play on its own (others held still).
import type { PlayReport } from '../src/analyze/play.js';
import { num } from './format.js';
import type { PlayView } from './html.js';

/** Descriptions of free motions shown at most (the rest are counted). */
const MAX_MOTIONS_SHOWN = 6;

export function playView(p: PlayReport): PlayView {
  const unit = p.units ?? 'layout units';
  const headline = p.locked
    ? p.lockedBy === 'first-order'
      ? 'Locked: no ring can move at all (except spinning about its own axis) without pressing into another.'
      : 'Locked: every small motion the contacts allow closes some contact at second order.'
    : p.secondOrder.escape
      ? 'Not locked, and a motion opens every contact: the rings could be made thicker still.'
      : 'Not locked: some rings can move while keeping every contact.';
  const rows: PlayView['rows'] = [
    { label: 'tube radius analysed', value: num(p.tube), unit },
    { label: 'active contacts', value: String(p.mobility.activeContacts), unit: 'count' },
    { label: 'free motions (first order, beyond spins and moving the whole set)', value: String(p.freeDimension), unit: 'count' },
    { label: 'of which reversible', value: String(p.reversibleDimension), unit: 'count' },
    { label: 'second-order test', value: p.secondOrder.outcome, unit: '' },
  ];
  if (p.secondOrder.thickenedTube !== null) {
    rows.push({ label: 'tube reached by following the escape', value: num(p.secondOrder.thickenedTube, 8), unit });
  }
  // Each ring alone, the others held still: the tightest and the loosest direction, so a reader sees both
  // "it cannot slide towards C at all" and "it can still slide 0.12 mm along z".
  for (const ring of p.play.rings) {
    for (const [kind, what, u] of [['translate', 'slide', unit], ['rotate', 'tilt', 'degrees']] as const) {
      const es = ring.entries.filter((e) => e.kind === kind);
      if (es.length === 0) continue;
      const lo = es.reduce((m, e) => (e.amount < m.amount ? e : m));
      const hi = es.reduce((m, e) => (e.amount > m.amount ? e : m));
      // Angles to 0.1 degree; lengths to 4 significant figures.
      const amount = (e: typeof lo): string => `${e.capped ? '> ' : ''}${kind === 'rotate' ? e.amount.toFixed(1) : num(e.amount, 4)}`;
      rows.push({
        label: `ring ${ring.name}: ${what} (least ${lo.direction}${lo.touches ? ` until it meets ${lo.touches}` : ''}; most ${hi.direction})`,
        value: `${amount(lo)} … ${amount(hi)}`,
        unit: u,
      });
    }
  }
  const motions = p.freeMotions.slice(0, MAX_MOTIONS_SHOWN).map((f) => `Free motion (${f.kind}): ${f.description}`);
  if (p.freeMotions.length > MAX_MOTIONS_SHOWN) motions.push(`… and ${p.freeMotions.length - MAX_MOTIONS_SHOWN} more free motions (see thickring play).`);
  return { locked: p.locked, headline, rows, notes: [...motions, ...p.notes] };
}
