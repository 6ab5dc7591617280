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
    rows.push({ label: 'tube reached by following the escape', value: num(p.secondOrder.thickenedTube), unit });
  }
  for (const ring of p.play.rings) {
    const moves = ring.entries.filter((e) => e.kind === 'translate');
    const turns = ring.entries.filter((e) => e.kind === 'rotate');
    const least = <T extends { amount: number }>(xs: T[]): T | undefined => xs.reduce<T | undefined>((m, e) => (m === undefined || e.amount < m.amount ? e : m), undefined);
    const m = least(moves), t = least(turns);
    if (m) {
      rows.push({
        label: `ring ${ring.name}: least sliding play (${m.direction}${m.touches ? `, meets ${m.touches}` : ''})`,
        value: `${m.capped ? '> ' : ''}${num(m.amount, 4)}`, unit,
      });
    }
    if (t) {
      rows.push({
        label: `ring ${ring.name}: least tilting play (${t.direction}${t.touches ? `, meets ${t.touches}` : ''})`,
        value: `${t.capped ? '> ' : ''}${num(t.amount, 4)}`, unit: 'degrees',
      });
    }
  }
  const motions = p.freeMotions.slice(0, MAX_MOTIONS_SHOWN).map((f) => `Free motion (${f.kind}): ${f.description}`);
  if (p.freeMotions.length > MAX_MOTIONS_SHOWN) motions.push(`… and ${p.freeMotions.length - MAX_MOTIONS_SHOWN} more free motions (see thickring play).`);
  return { locked: p.locked, headline, rows, notes: [...motions, ...p.notes] };
}
