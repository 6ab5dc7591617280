// Seeded workloads shared by the kernel benchmark and its worker threads.
import { seededRandom as mulberry32 } from '../src/model/random.js';

export const PAIR_STRIDE = 14; // cA(3) nA(3) RA cB(3) nB(3) RB


/** Random ring pairs of comparable size, often interlocked (centres within about one radius). */
export function makePairs(count: number, seed: number): Float64Array {
  const r = mulberry32(seed);
  const out = new Float64Array(count * PAIR_STRIDE);
  for (let i = 0; i < count; i++) {
    const o = i * PAIR_STRIDE;
    for (const base of [0, 7]) {
      for (let k = 0; k < 3; k++) out[o + base + k] = 2 * r() - 1;
      let nx = 0, ny = 0, nz = 0, l = 0;
      do { nx = 2 * r() - 1; ny = 2 * r() - 1; nz = 2 * r() - 1; l = Math.hypot(nx, ny, nz); } while (l < 0.1 || l > 1);
      out[o + base + 3] = nx / l; out[o + base + 4] = ny / l; out[o + base + 5] = nz / l;
      out[o + base + 6] = 0.5 + r();
    }
  }
  return out;
}
