// Telling the two result shapes apart.
import type { CompareResult, SolveResult } from '../src/model/result.js';

export function isCompareResult(result: SolveResult): result is CompareResult {
  const r = result as Partial<CompareResult>;
  return typeof r.symmetric === 'object' && r.symmetric !== null && typeof r.broken === 'object' && r.broken !== null;
}

/** "cyclic:3 about axis (0, 0, 1)" or "none". */
export function symmetryLabel(sym: SolveResult['symmetry']): string {
  if (!sym || sym.type === 'none') return 'none';
  const a = sym.axis.map((v) => Number(v.toPrecision(4))).join(', ');
  return `${sym.type}:${sym.order} about axis (${a})`;
}
