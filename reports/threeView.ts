// Data of the report's three.js 3D view (ui/reportView.ts, inlined into the page): rings with their tube
// radii, and struts with their forces. Plain numbers only; the page draws them.
import type { SolveResult } from '../src/model/result.js';
import { lengthUnit } from './format.js';

export interface ThreeViewData {
  rings: { name: string; center: number[]; normal: number[]; radius: number; tube: number }[];
  struts: { onA: number[]; onB: number[]; force: number }[];
  units: string;
}

export function threeViewData(result: SolveResult): ThreeViewData {
  return {
    rings: result.rings.map((r) => ({ name: r.name, center: r.center, normal: r.normal, radius: r.radius, tube: r.tube })),
    struts: (result.contacts ?? []).map((c) => ({ onA: c.onA, onB: c.onB, force: Number.isFinite(c.force) ? c.force : 0 })),
    units: lengthUnit(result),
  };
}
