// Tori and core circles of rings, as the arrays plotly's 3D traces take.
import { normalize, planeBasis } from '../src/model/vec.js';

/** A torus as plotly's surface trace takes it: rows along the core, columns around the tube (closed). */
export interface TorusGrid {
  x: number[][];
  y: number[][];
  z: number[][];
}

/**
 * Torus with core circle (center, normal, radius R) and tube radius r: `around` segments along the
 * core and `across` segments around the tube; first row/column repeated so the surface closes.
 * (A surface trace, not mesh3d: plotly's translucent mesh3d speckles, a translucent surface does not.)
 */
export function torusGrid(
  center: ArrayLike<number>,
  normal: ArrayLike<number>,
  R: number,
  r: number,
  around = 72,
  across = 20,
): TorusGrid {
  const n = normalize(normal);
  const [e1, e2] = planeBasis(n);
  const x: number[][] = [], y: number[][] = [], z: number[][] = [];
  for (let a = 0; a <= around; a++) {
    const u = (2 * Math.PI * a) / around;
    const cu = Math.cos(u), su = Math.sin(u);
    // radial unit vector of the core point at angle u
    const rx = cu * e1[0] + su * e2[0], ry = cu * e1[1] + su * e2[1], rz = cu * e1[2] + su * e2[2];
    const xr: number[] = [], yr: number[] = [], zr: number[] = [];
    for (let b = 0; b <= across; b++) {
      const v = (2 * Math.PI * b) / across;
      const w = R + r * Math.cos(v), h = r * Math.sin(v);
      xr.push(center[0]! + w * rx + h * n[0]);
      yr.push(center[1]! + w * ry + h * n[1]);
      zr.push(center[2]! + w * rz + h * n[2]);
    }
    x.push(xr); y.push(yr); z.push(zr);
  }
  return { x, y, z };
}

/** Points of the core circle, closed (first point repeated) for a line trace. */
export function circlePoints(
  center: ArrayLike<number>,
  normal: ArrayLike<number>,
  R: number,
  segments = 96,
): { x: number[]; y: number[]; z: number[] } {
  const [e1, e2] = planeBasis(normalize(normal));
  const x: number[] = [], y: number[] = [], z: number[] = [];
  for (let s = 0; s <= segments; s++) {
    const u = (2 * Math.PI * s) / segments;
    const cu = Math.cos(u) * R, su = Math.sin(u) * R;
    x.push(center[0]! + cu * e1[0] + su * e2[0]);
    y.push(center[1]! + cu * e1[1] + su * e2[1]);
    z.push(center[2]! + cu * e1[2] + su * e2[2]);
  }
  return { x, y, z };
}
