// Number formatting shared by the HTML report and the terminal summary: every figure goes out
// with its unit (layout units, mm, degrees, per cent) or says "dimensionless".
import type { SolveResult } from '../src/model/result.js';

export const DIMENSIONLESS = 'dimensionless';

/** The length unit of a result: its declared unit, else "layout units". */
export function lengthUnit(result: Pick<SolveResult, 'units'>): string {
  const u = result.units;
  return typeof u === 'string' && u.trim() !== '' ? u.trim() : 'layout units';
}

/** Significant-figure formatting without exponent noise for everyday magnitudes. */
export function num(x: number | null | undefined, digits = 5): string {
  if (x === null || x === undefined || Number.isNaN(x)) return 'n/a';
  if (!Number.isFinite(x)) return x > 0 ? 'infinite' : '-infinite';
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e-4 && a < 1e7) {
    // toPrecision then Number drops trailing zeros; keep the sign of tiny negatives visible.
    return String(Number(x.toPrecision(digits)));
  }
  return x.toExponential(Math.max(0, digits - 1)).replace(/\.?0+e/, 'e');
}

/** A value followed by its unit: "0.3021 mm", "12.5 degrees". */
export function withUnit(x: number | null | undefined, unit: string, digits = 5): string {
  const v = num(x, digits);
  return v === 'n/a' ? v : `${v} ${unit}`;
}

/** A fraction shown as per cent: 0.0526 -> "5.26 %". */
export function percent(fraction: number | null | undefined, digits = 3): string {
  if (fraction === null || fraction === undefined || !Number.isFinite(fraction)) return 'n/a';
  return `${num(fraction * 100, digits)} %`;
}

/** A signed value, e.g. a gain: "+0.0159 mm". */
export function signed(x: number | null | undefined, unit: string, digits = 4): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return 'n/a';
  const v = num(x, digits);
  return `${x > 0 ? '+' : ''}${v} ${unit}`;
}

/** Components below this fraction of a vector's largest are rounding noise (8.9e-17 beside 0.5 is 0). */
export const DISPLAY_ZERO_REL = 1e-12;

/** A point as "(x, y, z)"; rounding noise shown as 0. */
export function vec(v: ArrayLike<number>, digits = 4): string {
  const big = Math.max(Math.abs(v[0] ?? 0), Math.abs(v[1] ?? 0), Math.abs(v[2] ?? 0));
  const c = (x: number | undefined) => num(x !== undefined && Math.abs(x) <= DISPLAY_ZERO_REL * big ? 0 : x, digits);
  return `(${c(v[0])}, ${c(v[1])}, ${c(v[2])})`;
}

/**
 * A plain-text table: a header row and rows, columns padded to their widest cell, two spaces apart, indented
 * by two. Widths by a loop, not Math.max(...rows): spreading thousands of rows overflows the call stack.
 */
export function textTable(head: string[], rows: string[][]): string {
  const w = head.map((h, k) => rows.reduce((m, r) => Math.max(m, r[k]!.length), h.length));
  const line = (cells: string[]): string => '  ' + cells.map((c, k) => c.padEnd(w[k]!)).join('  ').trimEnd();
  return [line(head), ...rows.map(line)].join('\n');
}
