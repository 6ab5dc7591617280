// Wavefront OBJ: one `o name` group per body, 1-based vertex indices counted across the file.
import type { MeshBody } from './torusMesh.js';

/** Digits after the decimal point: 1e-6 mm is far below any printer's resolution. */
const DECIMALS = 6;

export function encodeObj(bodies: readonly MeshBody[]): string {
  const lines: string[] = ['# thickring mesh', '# units: mm'];
  let base = 1;
  for (const b of bodies) {
    lines.push(`o ${objName(b.name)}`);
    const p = b.positions;
    for (let i = 0; i < p.length; i += 3) lines.push(`v ${p[i]!.toFixed(DECIMALS)} ${p[i + 1]!.toFixed(DECIMALS)} ${p[i + 2]!.toFixed(DECIMALS)}`);
    const t = b.triangles;
    for (let f = 0; f < t.length; f += 3) lines.push(`f ${t[f]! + base} ${t[f + 1]! + base} ${t[f + 2]! + base}`);
    base += p.length / 3;
  }
  return lines.join('\n') + '\n';
}

// OBJ names end at whitespace; keep the ring name readable.
function objName(name: string): string {
  return name.replace(/\s+/g, '_');
}
