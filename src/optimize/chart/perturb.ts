// Deterministic start perturbations: the same seed gives the same start on any machine and in any worker,
// so multistart results do not depend on how starts are spread over workers.
import type { RingOrbits } from '../../model/symmetry.js';
import type { Ring } from '../../model/types.js';
import { buildChart, posedAt, ringsOf } from './chart.js';

import { seededRandom } from '../../model/random.js';

export { seededRandom };

/**
 * Move every orbit representative by up to `size`·R in each allowed direction (centre in layout units,
 * tilt in radians), keeping the symmetry; seed 0 or size 0 returns the rings unchanged.
 */
export function perturbRings(rings: readonly Ring[], orbits: RingOrbits, seed: number, size: number): Ring[] {
  if (seed === 0 || !(size > 0)) return rings.map((r) => ({ ...r, center: [...r.center], normal: [...r.normal] }));
  const chart = buildChart(rings, orbits, false);
  const random = seededRandom(seed);
  const z = new Float64Array(chart.nFree);
  for (const rep of chart.reps) {
    const k = rep.bc.length + rep.bn.length;
    for (let i = 0; i < k; i++) z[rep.offset + i] = (2 * random() - 1) * size * rep.radius;
  }
  return ringsOf(chart, posedAt(chart, z));
}
