// Seeded helpers for reproducible random tests.
export { seededRandom as rng } from '../../src/model/random.js';

export function randomUnit(r: () => number): [number, number, number] {
  for (;;) {
    const v: [number, number, number] = [2 * r() - 1, 2 * r() - 1, 2 * r() - 1];
    const l = Math.hypot(...v);
    if (l > 0.1 && l <= 1) return [v[0] / l, v[1] / l, v[2] / l];
  }
}

/** A random rotation matrix (row-major 3x3) from a random unit quaternion. */
export function randomRotation(r: () => number): number[] {
  let q: number[];
  for (;;) {
    q = [2 * r() - 1, 2 * r() - 1, 2 * r() - 1, 2 * r() - 1];
    const l = Math.hypot(...q);
    if (l > 0.1 && l <= 1) { q = q.map((x) => x / l); break; }
  }
  const [w, x, y, z] = q as [number, number, number, number];
  return [
    1 - 2 * (y * y + z * z), 2 * (x * y - w * z), 2 * (x * z + w * y),
    2 * (x * y + w * z), 1 - 2 * (x * x + z * z), 2 * (y * z - w * x),
    2 * (x * z - w * y), 2 * (y * z + w * x), 1 - 2 * (x * x + y * y),
  ];
}

export function applyRotation(m: number[], v: ArrayLike<number>): [number, number, number] {
  return [
    m[0]! * v[0]! + m[1]! * v[1]! + m[2]! * v[2]!,
    m[3]! * v[0]! + m[4]! * v[1]! + m[5]! * v[2]!,
    m[6]! * v[0]! + m[7]! * v[1]! + m[8]! * v[2]!,
  ];
}
