// Start layouts built by hand for the optimizer tests (not the catalogue's, so the tests do not lean on it).
import type { Ring } from '../src/model/types.js';

/** K equal rings upright through a central ring, centred 1.2 R from the axis. */
export function star(K: number): Ring[] {
  const rings: Ring[] = [{ name: 'C', center: [0, 0, 0], normal: [0, 0, 1], radius: 1 }];
  for (let k = 0; k < K; k++) {
    const th = (2 * Math.PI * k) / K;
    rings.push({ name: `R${k}`, center: [1.2 * Math.cos(th), 1.2 * Math.sin(th), 0], normal: [-Math.sin(th), Math.cos(th), 0], radius: 1 });
  }
  return rings;
}
