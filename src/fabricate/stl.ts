// Binary STL: 80-byte header, uint32 triangle count, then 50 bytes per triangle (normal and three
// vertices as little-endian float32, uint16 attribute byte count = 0). STL has no units; the header says mm.
import type { MeshBody } from './torusMesh.js';

export const STL_HEADER_BYTES = 80;
export const STL_TRIANGLE_BYTES = 50;

export function encodeStl(bodies: readonly MeshBody[], header = 'thickring mesh, units mm'): Uint8Array {
  const count = bodies.reduce((s, b) => s + b.triangles.length / 3, 0);
  const bytes = new Uint8Array(STL_HEADER_BYTES + 4 + STL_TRIANGLE_BYTES * count);
  const view = new DataView(bytes.buffer);
  // The header must not start with "solid": some readers would take the file for ASCII STL.
  const text = header.toLowerCase().startsWith('solid') ? `mesh ${header}` : header;
  for (let i = 0; i < Math.min(text.length, STL_HEADER_BYTES); i++) bytes[i] = text.charCodeAt(i) & 0x7f;
  view.setUint32(STL_HEADER_BYTES, count, true);
  let o = STL_HEADER_BYTES + 4;
  for (const b of bodies) {
    const p = b.positions, t = b.triangles;
    for (let f = 0; f < t.length; f += 3) {
      const i = 3 * t[f]!, j = 3 * t[f + 1]!, k = 3 * t[f + 2]!;
      const ux = p[j]! - p[i]!, uy = p[j + 1]! - p[i + 1]!, uz = p[j + 2]! - p[i + 2]!;
      const vx = p[k]! - p[i]!, vy = p[k + 1]! - p[i + 1]!, vz = p[k + 2]! - p[i + 2]!;
      let nx = uy * vz - uz * vy, ny = uz * vx - ux * vz, nz = ux * vy - uy * vx;
      const l = Math.hypot(nx, ny, nz);
      if (l > 0) { nx /= l; ny /= l; nz /= l; }
      view.setFloat32(o, nx, true); view.setFloat32(o + 4, ny, true); view.setFloat32(o + 8, nz, true);
      o += 12;
      for (const v of [i, j, k]) {
        view.setFloat32(o, p[v]!, true); view.setFloat32(o + 4, p[v + 1]!, true); view.setFloat32(o + 8, p[v + 2]!, true);
        o += 12;
      }
      view.setUint16(o, 0, true);
      o += 2;
    }
  }
  return bytes;
}
