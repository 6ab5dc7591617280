// Meshes of printed rings: chord-tolerance resolution, mesh checker, and the three file formats.
// Sources: Pappus's centroid theorems for the torus (V = 2 pi^2 R r^2, A = 4 pi^2 R r); the sagitta
// of a chord s = rho (1 - cos(pi / n)) (elementary geometry); Euler characteristic of the torus 0;
// binary STL layout (3D Systems, "StereoLithography Interface Specification", 1989: 80-byte header,
// uint32 count, 50 bytes per facet); 3MF Core Specification (3MF Consortium): OPC parts
// [Content_Types].xml, _rels/.rels, 3D/3dmodel.model, <model unit="millimeter">, counter-clockwise
// triangles seen from outside.
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { strFromU8, unzipSync } from 'fflate';
import { describe, expect, it } from 'vitest';
import { checkMeshes, pappusTolerance } from '../src/fabricate/meshCheck.js';
import { encodeObj } from '../src/fabricate/obj.js';
import { planFabrication } from '../src/fabricate/plan.js';
import { encodeStl, STL_HEADER_BYTES, STL_TRIANGLE_BYTES } from '../src/fabricate/stl.js';
import { CORE_NAMESPACE, encode3mf } from '../src/fabricate/threeMf.js';
import { segmentsForChord, torusMesh, torusSegments, type MeshBody, type Torus } from '../src/fabricate/torusMesh.js';
import { main } from '../cli/main.js';
import { captureIo, pointCircleDistance, tempDir, threeChain, tightHopf, writeResult } from './fabricateFixtures.js';

const tilted: Torus = { name: 'T', center: [1, -2, 0.5], normal: [0.3, -0.4, 0.8], radius: 10, tube: 3 };

function printedTori(result = tightHopf(), clearance = 0.3, core = 10): Torus[] {
  const plan = planFabrication(result, { size: { kind: 'coreRadius', value: core }, process: 'fdm', clearance });
  return plan.rings.map((r) => ({ name: r.name, center: r.center, normal: r.normal, radius: r.radius, tube: r.printedTube }));
}

describe('segment counts from the chord tolerance (sagitta s = rho (1 - cos(pi/n)))', () => {
  it('the chosen count meets the tolerance and one fewer does not', () => {
    for (const [rho, chord] of [[13, 0.01], [3, 0.05], [100, 0.001], [0.5, 0.2]] as const) {
      const n = segmentsForChord(rho, chord);
      expect(rho * (1 - Math.cos(Math.PI / n))).toBeLessThanOrEqual(chord);
      if (n > 3) expect(rho * (1 - Math.cos(Math.PI / (n - 1)))).toBeGreaterThan(chord);
    }
  });

  it('around the core uses the outer equator R + r, around the tube the tube radius r', () => {
    const s = torusSegments(10, 3, 0.01);
    expect(s.core).toBe(segmentsForChord(13, 0.01));
    expect(s.tube).toBe(segmentsForChord(3, 0.01));
  });

  it('every vertex lies on the exact torus (point-circle distance = r, Eberly)', () => {
    const m = torusMesh(tilted, 0.05);
    const n = Math.hypot(0.3, -0.4, 0.8);
    for (let i = 0; i < m.positions.length; i += 3) {
      const d = pointCircleDistance(m.positions.subarray(i, i + 3), tilted.center, [0.3 / n, -0.4 / n, 0.8 / n], 10);
      expect(Math.abs(d - 3)).toBeLessThan(1e-12 * 13);
    }
  });
});

describe('mesh checker', () => {
  it('a torus mesh is closed, consistently oriented, Euler 0, outward', () => {
    const m = torusMesh(tilted, 0.05);
    const rep = checkMeshes([m], { tori: [tilted], clearance: 0, chord: 0.05 });
    const b = rep.bodies[0]!;
    expect(b.closedOriented).toBe(true);
    expect(b.euler).toBe(0);
    expect(b.volume).toBeGreaterThan(0);
    expect(rep.ok).toBe(true);
  });

  it('volume and area converge to Pappus as the chord shrinks, within the stated tolerance', () => {
    const V = 2 * Math.PI ** 2 * tilted.radius * tilted.tube ** 2;
    const A = 4 * Math.PI ** 2 * tilted.radius * tilted.tube;
    let prevV = Infinity, prevA = Infinity;
    for (const chord of [0.3, 0.1, 0.03, 0.01, 0.003]) {
      const m = torusMesh(tilted, chord);
      const b = checkMeshes([m], { tori: [tilted], clearance: 0, chord }).bodies[0]!;
      const eV = Math.abs(b.volume - V) / V, eA = Math.abs(b.area - A) / A;
      expect(eV).toBeLessThan(prevV);
      expect(eA).toBeLessThan(prevA);
      expect(eV).toBeLessThanOrEqual(pappusTolerance(tilted, chord));
      expect(eA).toBeLessThanOrEqual(pappusTolerance(tilted, chord));
      // Inscribed polygons: the faceted torus is smaller than the true one.
      expect(b.volume).toBeLessThan(V);
      prevV = eV;
      prevA = eA;
    }
    expect(prevV).toBeLessThan(2e-3);
    expect(prevA).toBeLessThan(1e-3);
  });

  it('detects a flipped triangle, a missing triangle and an inside-out body', () => {
    const m = torusMesh(tilted, 0.3);
    const flipped: MeshBody = { ...m, triangles: m.triangles.slice() };
    [flipped.triangles[1], flipped.triangles[2]] = [flipped.triangles[2]!, flipped.triangles[1]!];
    expect(checkMeshes([flipped], { clearance: 0, chord: 0.3 }).bodies[0]!.closedOriented).toBe(false);
    const holed: MeshBody = { ...m, triangles: m.triangles.slice(3) };
    const h = checkMeshes([holed], { clearance: 0, chord: 0.3 });
    expect(h.bodies[0]!.closedOriented).toBe(false);
    expect(h.ok).toBe(false);
    const inverted: MeshBody = { ...m, triangles: m.triangles.slice() };
    for (let t = 0; t < inverted.triangles.length; t += 3) {
      [inverted.triangles[t + 1], inverted.triangles[t + 2]] = [inverted.triangles[t + 2]!, inverted.triangles[t + 1]!];
    }
    const inv = checkMeshes([inverted], { clearance: 0, chord: 0.3 });
    expect(inv.bodies[0]!.closedOriented).toBe(true);
    expect(inv.bodies[0]!.volume).toBeLessThan(0);
    expect(inv.ok).toBe(false);
  });

  it('an octahedron (a sphere) has Euler characteristic 2, not a torus', () => {
    const positions = new Float64Array([1, 0, 0, -1, 0, 0, 0, 1, 0, 0, -1, 0, 0, 0, 1, 0, 0, -1]);
    // Faces counter-clockwise seen from outside.
    const triangles = new Uint32Array([0, 2, 4, 2, 1, 4, 1, 3, 4, 3, 0, 4, 2, 0, 5, 1, 2, 5, 3, 1, 5, 0, 3, 5]);
    const rep = checkMeshes([{ name: 'octa', positions, triangles }], { clearance: 0, chord: 0.1 });
    expect(rep.bodies[0]!.closedOriented).toBe(true);
    expect(rep.bodies[0]!.euler).toBe(2);
    // Volume of the regular octahedron with vertices at unit distance: 4/3 (from the formula sqrt(2)/3 a^3, a = sqrt 2).
    expect(rep.bodies[0]!.volume).toBeCloseTo(4 / 3, 12);
    expect(rep.ok).toBe(false);
  });

  it('tight Hopf printed with clearance c: least mesh gap within [c - chord, c + chord]', () => {
    // At the tight Hopf optimum the tubes touch along circles (Cantarella-Kusner-Sullivan 2002); shrinking
    // each tube by c/2 leaves exactly c between them.
    const c = 0.3, chord = 0.02;
    const tori = printedTori(tightHopf(), c);
    const bodies = tori.map((t) => torusMesh(t, chord));
    const rep = checkMeshes(bodies, { tori, clearance: c, chord });
    expect(rep.ok).toBe(true);
    expect(rep.minGap).not.toBeNull();
    expect(rep.minGap!).toBeGreaterThanOrEqual(c - chord);
    expect(rep.minGap!).toBeLessThanOrEqual(c + chord);
    // The generic path (no torus hint, winding-number inside test) agrees; a coarser mesh keeps it quick.
    const coarse = tori.map((t) => torusMesh(t, 0.1));
    const hinted = checkMeshes(coarse, { tori, clearance: c, chord: 0.1 });
    const generic = checkMeshes(coarse, { clearance: c, chord: 0.1 });
    expect(generic.minGap!).toBeCloseTo(hinted.minGap!, 12);
  });

  it('three-chain at the packing bound: every touching pair ends up c apart (within the chord)', () => {
    const c = 0.5, chord = 0.02;
    const tori = printedTori(threeChain(), c, 6);
    const rep = checkMeshes(tori.map((t) => torusMesh(t, chord)), { tori, clearance: c, chord });
    expect(rep.ok).toBe(true);
    expect(rep.gaps.map((g) => [g.a, g.b])).toEqual([[0, 1], [0, 2], [1, 2]]);
    for (const g of rep.gaps) {
      expect(g.distance).toBeGreaterThanOrEqual(c - chord);
      expect(g.distance).toBeLessThanOrEqual(c + chord);
    }
  });

  it('overlapping bodies give a negative gap and fail, with and without the torus hint', () => {
    // Tubes of 0.6 on the tight Hopf cores (core distance 1) overlap by 0.2.
    const tori: Torus[] = tightHopf().rings.map((r) => ({ name: r.name, center: r.center, normal: r.normal, radius: r.radius, tube: 0.6 }));
    const bodies = tori.map((t) => torusMesh(t, 0.01));
    for (const rep of [checkMeshes(bodies, { tori, clearance: 0, chord: 0.01 }), checkMeshes(bodies, { clearance: 0, chord: 0.01 })]) {
      expect(rep.minGap!).toBeLessThan(-0.15);
      expect(rep.ok).toBe(false);
    }
  });
});

describe('file formats', () => {
  const tori = printedTori();
  const bodies = tori.map((t) => torusMesh(t, 0.1));
  const triangles = bodies.reduce((s, b) => s + b.triangles.length / 3, 0);

  it('binary STL: 80-byte header, uint32 count, 50 bytes per triangle, unit normals matching the winding', () => {
    const stl = encodeStl(bodies);
    expect(stl.length).toBe(STL_HEADER_BYTES + 4 + STL_TRIANGLE_BYTES * triangles);
    expect(STL_HEADER_BYTES).toBe(80);
    expect(STL_TRIANGLE_BYTES).toBe(50);
    const view = new DataView(stl.buffer, stl.byteOffset, stl.byteLength);
    expect(view.getUint32(80, true)).toBe(triangles);
    expect(new TextDecoder().decode(stl.subarray(0, 5)).toLowerCase()).not.toBe('solid');
    for (const t of [0, 1, triangles - 1]) {
      const o = 84 + 50 * t;
      const f = (k: number) => view.getFloat32(o + 4 * k, true);
      const n = [f(0), f(1), f(2)];
      const a = [f(3), f(4), f(5)], b = [f(6), f(7), f(8)], c = [f(9), f(10), f(11)];
      const u = [b[0]! - a[0]!, b[1]! - a[1]!, b[2]! - a[2]!], v = [c[0]! - a[0]!, c[1]! - a[1]!, c[2]! - a[2]!];
      const w = [u[1]! * v[2]! - u[2]! * v[1]!, u[2]! * v[0]! - u[0]! * v[2]!, u[0]! * v[1]! - u[1]! * v[0]!];
      const lw = Math.hypot(w[0]!, w[1]!, w[2]!);
      expect(Math.hypot(n[0]!, n[1]!, n[2]!)).toBeCloseTo(1, 6);
      expect((n[0]! * w[0]! + n[1]! * w[1]! + n[2]! * w[2]!) / lw).toBeGreaterThan(0.999);
      expect(view.getUint16(o + 48, true)).toBe(0);
    }
  });

  it('OBJ: one named object per ring, 1-based indices in range', () => {
    const text = encodeObj(bodies);
    const lines = text.trim().split('\n');
    expect(lines.filter((l) => l.startsWith('o ')).map((l) => l.slice(2))).toEqual(['A', 'B']);
    const nv = lines.filter((l) => l.startsWith('v ')).length;
    const faces = lines.filter((l) => l.startsWith('f '));
    expect(nv).toBe(bodies.reduce((s, b) => s + b.positions.length / 3, 0));
    expect(faces.length).toBe(triangles);
    for (const f of faces) for (const i of f.slice(2).split(' ').map(Number)) expect(i >= 1 && i <= nv).toBe(true);
  });

  it('3MF: a zip with the three OPC parts and a millimetre model with one named object per ring', () => {
    const files = unzipSync(encode3mf(bodies));
    expect(Object.keys(files).sort()).toEqual(['3D/3dmodel.model', '[Content_Types].xml', '_rels/.rels']);
    const types = strFromU8(files['[Content_Types].xml']!);
    expect(types).toContain('Extension="model" ContentType="application/vnd.ms-package.3dmanufacturing-3dmodel+xml"');
    expect(types).toContain('Extension="rels"');
    const rels = strFromU8(files['_rels/.rels']!);
    expect(rels).toMatch(/Target="\/3D\/3dmodel\.model"[^>]*Type="http:\/\/schemas\.microsoft\.com\/3dmanufacturing\/2013\/01\/3dmodel"/);
    const model = strFromU8(files['3D/3dmodel.model']!);
    const root = /<model\b([^>]*)>/.exec(model)![1]!;
    expect(root).toContain('unit="millimeter"');
    expect(root).toContain(`xmlns="${CORE_NAMESPACE}"`);
    const objects = [...model.matchAll(/<object id="(\d+)" name="([^"]*)" type="model">\s*<mesh>([\s\S]*?)<\/object>/g)];
    expect(objects.map((m) => m[2])).toEqual(['A', 'B']);
    objects.forEach((m, k) => {
      const body = m[3]!;
      const verts = [...body.matchAll(/<vertex x="([-\d.]+)" y="([-\d.]+)" z="([-\d.]+)"\/>/g)];
      const tris = [...body.matchAll(/<triangle v1="(\d+)" v2="(\d+)" v3="(\d+)"\/>/g)];
      expect(verts.length).toBe(bodies[k]!.positions.length / 3);
      expect(tris.length).toBe(bodies[k]!.triangles.length / 3);
      for (const t of tris) for (const i of [t[1], t[2], t[3]].map(Number)) expect(i).toBeLessThan(verts.length);
    });
    // One build item: an object of components that references every ring's mesh object, so the rings move as one.
    const items = [...model.matchAll(/<item objectid="(\d+)"\/>/g)].map((m) => m[1]);
    expect(items.length).toBe(1);
    const assembly = new RegExp(`<object id="${items[0]}"[^>]*>\\s*<components>([\\s\\S]*?)</components>`).exec(model);
    expect(assembly).not.toBeNull();
    const parts = [...assembly![1]!.matchAll(/<component objectid="(\d+)"\/>/g)].map((m) => m[1]);
    expect(parts).toEqual(objects.map((m) => m[1]));
    // Components must refer to objects defined earlier in the resources (3MF Core Specification, 3.4.2).
    expect(model.indexOf(`<object id="${items[0]}"`)).toBeGreaterThan(model.indexOf(`<object id="${objects[objects.length - 1]![1]}"`));
  });

  it('fabricate puts the assembly on the build plate: lowest vertex z = 0, centred in x and y (every format)', async () => {
    const dir = tempDir('plate');
    const path = writeResult(dir, 'chain.json', threeChain());
    const stl = join(dir, 'c.stl'), obj = join(dir, 'c.obj'), tmf = join(dir, 'c.3mf');
    expect(await main(['fabricate', path, '--core-radius', '6', '--process', 'fdm', '--chord', '0.05', '--stl', stl, '--obj', obj, '--3mf', tmf], captureIo())).toBe(0);
    const ext = (xs: number[][]) => [0, 1, 2].map((k) => [Math.min(...xs.map((p) => p[k]!)), Math.max(...xs.map((p) => p[k]!))]);
    const objVerts = readFileSync(obj, 'utf8').split('\n').filter((l) => l.startsWith('v ')).map((l) => l.slice(2).split(' ').map(Number));
    const model = strFromU8(unzipSync(readFileSync(tmf))['3D/3dmodel.model']!);
    const tmfVerts = [...model.matchAll(/<vertex x="([-\d.]+)" y="([-\d.]+)" z="([-\d.]+)"\/>/g)].map((m) => [Number(m[1]), Number(m[2]), Number(m[3])]);
    const bytes = readFileSync(stl);
    const stlVerts: number[][] = [];
    for (let t = 0; t < bytes.readUInt32LE(80); t++) for (let v = 0; v < 3; v++) {
      const o = 84 + 50 * t + 12 + 12 * v;
      stlVerts.push([bytes.readFloatLE(o), bytes.readFloatLE(o + 4), bytes.readFloatLE(o + 8)]);
    }
    for (const verts of [objVerts, tmfVerts, stlVerts]) {
      const [x, y, z] = ext(verts);
      expect(z![0]).toBeCloseTo(0, 5);
      // Centred in x, y within the chord: facets sit inside the exact torus by at most the chord (sagitta).
      expect(Math.abs(x![0]! + x![1]!)).toBeLessThan(2 * 0.05);
      expect(Math.abs(y![0]! + y![1]!)).toBeLessThan(2 * 0.05);
    }
  });

  const hasAdmesh = (() => {
    try {
      execFileSync('which', ['admesh'], { stdio: 'ignore' });
      return true;
    } catch {
      return false;
    }
  })();
  it.skipIf(!hasAdmesh)('admesh reads the placed assembly: lowest z = 0, nothing to repair, volume of the two tori', () => {
    const dir = tempDir('admesh');
    const path = writeResult(dir, 'hopf.json', tightHopf());
    const stl = join(dir, 'hopf.stl');
    return main(['fabricate', path, '--core-radius', '10', '--process', 'fdm', '--chord', '0.05', '--stl', stl], captureIo()).then((code) => {
      expect(code).toBe(0);
      const out = execFileSync('admesh', [stl], { encoding: 'utf8' });
      expect(out).toMatch(/Number of parts\s*:\s*2/);
      expect(out).toMatch(/Backwards edges\s*:\s*0/);
      expect(out).toMatch(/Normals fixed\s*:\s*0/);
      expect(out).toMatch(/Degenerate facets\s*:\s*0/);
      expect(out).toMatch(/Edges fixed\s*:\s*0/);
      // On the build plate: admesh's Min Z is 0 (float32 in the file).
      const minZ = Number(/Min Z\s*=\s*([-\d.e+]+)/.exec(out)![1]);
      expect(Math.abs(minZ)).toBeLessThan(1e-5);
      // Pappus: V = 2 pi^2 R r^2 per torus, printed r = 5 - 0.15 mm, R = 10 mm; facets lose at most the chord's share.
      const volume = Number(/Volume\s*:\s*([\d.e+]+)/.exec(out)![1]);
      const exact = 2 * 2 * Math.PI ** 2 * 10 * 4.85 ** 2;
      expect(volume).toBeLessThanOrEqual(exact);
      expect(volume).toBeGreaterThan(exact * (1 - 2 * 0.05 / 4.85));
      expect(readFileSync(stl).length).toBeGreaterThan(84);
    });
  });
});
