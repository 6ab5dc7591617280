// Fuzz family of the solver: random held layouts (trees of 2-6 linked rings of unequal size, each child
// through its parent like a tilted Hopf pair) through `thickring inflate`. Each run ends in a result the
// independent checker (src/check/verify.ts: brute-force distances, Gauss linking integrals) accepts, or in
// an honest failed/infeasible status with exit 1 and the existing output file untouched.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { gaussLinkingMatrix, verifyConfiguration } from '../../src/check/verify.js';
import { parseLayout } from '../../src/model/layout.js';
import type { SolveResult } from '../../src/model/result.js';
import { parseResult } from '../../src/model/resultFile.js';
import type { Ring, Vec3 } from '../../src/model/types.js';
import { linkingNumber } from '../../src/topology/index.js';
import { runCli } from './cli.props.js';
import { checkOutcome } from './jsonFuzz.js';

interface Family {
  name: string;
  arbitrary: fc.Arbitrary<any>;
  check: (x: any) => void | Promise<void>;
  runs?: number;
}

interface Tree {
  rings: Ring[];
  /** parent[k] for k >= 1. */
  parent: number[];
}

const SENTINEL = 'existing file: must survive a failed run\n';

function unit(v: Vec3): Vec3 {
  const l = Math.hypot(v[0], v[1], v[2]);
  return [v[0] / l, v[1] / l, v[2] / l];
}
function cross(a: Vec3, b: Vec3): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}
function basis(n: Vec3): [Vec3, Vec3] {
  const t: Vec3 = Math.abs(n[0]) < 0.9 ? [1, 0, 0] : [0, 1, 0];
  const e1 = unit(cross(n, t));
  return [e1, cross(n, e1)];
}

/**
 * Ring k sits on its parent's core (centre at s·R_p along u in the parent's plane), in the plane spanned by
 * u and the parent's normal, then tilted by α about u: it crosses the parent's plane on the line of u at
 * s·R_p ± R_k, one point inside the parent's disk and one outside for the sizes drawn, so the pair is linked.
 */
function buildTree(n: number, draws: { parent: number; theta: number; s: number; tilt: number; radius: number }[], n0: Vec3, r0: number): Tree {
  const rings: Ring[] = [{ name: 'R0', center: [0, 0, 0], normal: unit(n0), radius: r0 }];
  const parent = [-1];
  for (let k = 1; k < n; k++) {
    const d = draws[k - 1]!;
    const p = d.parent % k;
    const P = rings[p]!;
    const [e1, e2] = basis(P.normal);
    const u: Vec3 = [0, 1, 2].map((i) => Math.cos(d.theta) * e1[i]! + Math.sin(d.theta) * e2[i]!) as Vec3;
    const w = cross(P.normal, u);
    // Tilt about u: the normal turns from w towards the parent's normal.
    const normal = unit([0, 1, 2].map((i) => Math.cos(d.tilt) * w[i]! + Math.sin(d.tilt) * P.normal[i]!) as Vec3);
    const center = [0, 1, 2].map((i) => P.center[i]! + d.s * P.radius * u[i]!) as Vec3;
    rings.push({ name: `R${k}`, center, normal, radius: d.radius * P.radius });
    parent.push(p);
  }
  return { rings, parent };
}

const tree: fc.Arbitrary<Tree> = fc.record({
  n: fc.integer({ min: 2, max: 6 }),
  n0: fc.tuple(fc.double({ min: -1, max: 1, noNaN: true }), fc.double({ min: -1, max: 1, noNaN: true }), fc.double({ min: 0.2, max: 1, noNaN: true })),
  r0: fc.double({ min: 0.5, max: 2, noNaN: true }),
  draws: fc.array(fc.record({
    parent: fc.nat({ max: 100 }),
    theta: fc.double({ min: 0, max: 2 * Math.PI, noNaN: true }),
    s: fc.double({ min: 0.85, max: 1.15, noNaN: true }),
    tilt: fc.double({ min: -0.4, max: 0.4, noNaN: true }),
    radius: fc.double({ min: 0.8, max: 1.25, noNaN: true }),
  }), { minLength: 5, maxLength: 5 }),
}).map(({ n, n0, r0, draws }) => buildTree(n, draws, n0 as Vec3, r0))
  // Keep trees whose rings do not cross and whose every parent-child pair is linked (siblings may clash).
  .filter((t) => {
    try {
      parseLayout({ format: 'thickring-layout/1', rings: t.rings }, 'tree');
    } catch {
      return false;
    }
    return t.parent.every((p, k) => k === 0 || linkingNumber(t.rings[k]!, t.rings[p]!) !== 0);
  });

let dir: string | null = null;
let counter = 0;

async function checkInflate({ t, seed }: { t: Tree; seed: number }): Promise<void> {
  dir ??= mkdtempSync(join(tmpdir(), 'thickring-fuzz-inflate-'));
  const file = join(dir, `${counter}-tree.json`), out = join(dir, `${counter++}-out.json`);
  writeFileSync(file, JSON.stringify({ format: 'thickring-layout/1', rings: t.rings }));
  writeFileSync(out, SENTINEL);
  const o = await runCli(['inflate', file, '--json', '--starts', '1', '--workers', '1', '--seed', String(seed), '-o', out]);
  const what = `inflate of ${JSON.stringify(t.rings)}`;
  checkOutcome(o, true, what, [1]);
  if (o.code === 2) throw new Error(`${what}: a valid held layout was refused: ${o.stderr}`);
  const r = JSON.parse(o.stdout.split('\n')[0]!) as SolveResult;
  if (o.code === 1) {
    if (r.status !== 'failed' && r.status !== 'infeasible') throw new Error(`${what}: exit 1 with status ${r.status}`);
    if (readFileSync(out, 'utf8') !== SENTINEL) throw new Error(`${what}: failed run changed the existing output file`);
    return;
  }
  if (r.status !== 'optimal' && r.status !== 'stalled') throw new Error(`${what}: exit 0 with status ${r.status}`);
  // The checker's own linking numbers of the input (Gauss integrals), not the solver's.
  const want = gaussLinkingMatrix(t.rings).map((row) => row.map((x) => x ?? Number.NaN));
  const v = verifyConfiguration({ rings: r.rings, tube: r.tube, tubeRatios: r.tubeRatios, linking: want });
  if (!v.ok) throw new Error(`${what}: the independent check rejects the result: ${v.messages.join('; ')}`);
  if (!(r.tube > 0)) throw new Error(`${what}: tube ${r.tube}`);
  // Every ring's tube is bounded by its own core radius (thickness <= R, Gonzalez-Maddocks 1999).
  for (const ring of r.rings) if (ring.tube > ring.radius * (1 + 1e-12)) throw new Error(`${what}: ring ${ring.name} tube above its radius`);
  parseResult(JSON.parse(readFileSync(out, 'utf8')), out);
}

export const families: Family[] = [
  // CI: small trees only (a 6-ring tree can take minutes); the long run draws 2-6 rings.
  { name: 'inflate-small', arbitrary: fc.record({ t: tree.filter((t) => t.rings.length <= 3), seed: fc.nat({ max: 1000 }) }), check: checkInflate, runs: 2 },
  { name: 'inflate-held', arbitrary: fc.record({ t: tree, seed: fc.nat({ max: 1000 }) }), check: checkInflate, runs: 0 },
];
