// Result files built by hand from closed-form configurations, for the fabricate / mesh / tracks tests.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Io } from '../cli/io.js';
import { RESULT_FORMAT, type ResultContact, type ResultRing, type SolveResult } from '../src/model/result.js';
import type { Vec3 } from '../src/model/types.js';

interface RingSpec {
  name: string;
  center: Vec3;
  normal: Vec3;
  radius: number;
  tube: number;
}

export function makeResult(spec: string, ringSpecs: RingSpec[], contacts: ResultContact[], linking: number[][]): SolveResult {
  const rings: ResultRing[] = ringSpecs.map((r) => ({ ...r, aspectRatio: (r.radius - r.tube) / r.tube }));
  const tube = Math.min(...rings.map((r) => r.tube));
  const thinnest = rings.reduce((a, b) => (b.tube < a.tube ? b : a));
  return {
    format: RESULT_FORMAT,
    command: 'inflate',
    spec,
    units: null,
    status: 'optimal',
    tube,
    tubeOverCore: tube / Math.min(...rings.map((r) => r.radius)),
    aspectRatio: thinnest.aspectRatio,
    tubeRatios: rings.map(() => 1),
    rings,
    linking,
    symmetry: null,
    contacts,
    certificate: {
      method: 'hand-built',
      balanceResidual: 0,
      maxViolation: 0,
      activeStruts: contacts.length,
      certified: true,
      note: 'closed-form configuration built by hand for tests',
    },
    bound: null,
    starts: [],
    verification: { ok: true, minClearance: 0, linkingPreserved: true, tubeWithinRadius: true, messages: [] },
    elapsedSeconds: 0,
  };
}

/**
 * Tight Hopf link (Cantarella, Kusner, Sullivan, Invent. Math. 150, 2002): ring A in the xy-plane,
 * centre 0, radius 1; ring B in the xz-plane, centre (1,0,0), radius 1; tube 1/2. Every point of B's
 * core is at distance 1 from A's core (and vice versa), so the tubes touch along continua. The
 * contacts are representatives of both continua: (A's point (1,0,0), any point of B) and
 * (B's core point (0,0,0), which is A's centre, and any point of A's core).
 */
export function tightHopf(): SolveResult {
  const contacts: ResultContact[] = [];
  const reps = 6;
  for (let k = 0; k < reps; k++) {
    const t = (2 * Math.PI * (k + 0.5)) / reps;
    // B's core point (1 + cos t, 0, sin t); its nearest point of A's core is (1, 0, 0).
    contacts.push({ a: 0, b: 1, onA: [1, 0, 0], onB: [1 + Math.cos(t), 0, Math.sin(t)], distance: 1, force: 1 / (2 * reps), continuum: true });
  }
  for (let k = 0; k < reps; k++) {
    const s = (2 * Math.PI * (k + 0.25)) / reps;
    // A's core point (cos s, sin s, 0); its nearest point of B's core is B's point (0, 0, 0).
    contacts.push({ a: 0, b: 1, onA: [Math.cos(s), Math.sin(s), 0], onB: [0, 0, 0], distance: 1, force: 1 / (2 * reps), continuum: true });
  }
  return makeResult(
    'hopf',
    [
      { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 1, tube: 0.5 },
      { name: 'B', center: [1, 0, 0], normal: [0, 1, 0], radius: 1, tube: 0.5 },
    ],
    contacts,
    [[0, 1], [1, 0]],
  );
}

/**
 * Three-ring chain at the circle-packing bound r = R/3 (two rings through one ring: Graham et al.,
 * Discrete Math. 181, 1998, k = 2 gives r_2 = 1/2 of the disk radius, i.e. tube <= R/3). B in the
 * xz-plane at the origin; A and C in the xy-plane at (-4/3, 0, 0) and (4/3, 0, 0). A's core pierces
 * B's disk at x = -1/3; d(A, B)^2 = 10/9 - (2/3) cos s has its single minimum 2/3 = 2r at s = 0, and
 * A and C (coplanar, centres 8/3 apart) are 8/3 - 2 = 2/3 apart: every pair touches.
 */
export function threeChain(): SolveResult {
  const third = 1 / 3;
  return makeResult(
    'chain:3',
    [
      { name: 'A', center: [-4 * third, 0, 0], normal: [0, 0, 1], radius: 1, tube: third },
      { name: 'B', center: [0, 0, 0], normal: [0, 1, 0], radius: 1, tube: third },
      { name: 'C', center: [4 * third, 0, 0], normal: [0, 0, 1], radius: 1, tube: third },
    ],
    [
      { a: 0, b: 1, onA: [-third, 0, 0], onB: [-1, 0, 0], distance: 2 * third, force: 1 / 3 },
      { a: 1, b: 2, onA: [1, 0, 0], onB: [third, 0, 0], distance: 2 * third, force: 1 / 3 },
      { a: 0, b: 2, onA: [-third, 0, 0], onB: [third, 0, 0], distance: 2 * third, force: 1 / 3 },
    ],
    [[0, 1, 0], [1, 0, 1], [0, 1, 0]],
  );
}

export function tempDir(prefix: string): string {
  return mkdtempSync(join(tmpdir(), `thickring-${prefix}-`));
}

export function writeResult(dir: string, name: string, data: unknown): string {
  const path = join(dir, name);
  writeFileSync(path, JSON.stringify(data));
  return path;
}

export interface CapturedIo extends Io {
  stdout: string[];
  stderr: string[];
}

export function captureIo(): CapturedIo {
  const stdout: string[] = [], stderr: string[] = [];
  return { stdout, stderr, out: (t) => void stdout.push(t), err: (t) => void stderr.push(t), interactive: false };
}

/** Distance from p to the circle (c, unit n, R): Eberly, "Distance to Circles in 3D", d^2 = (n.D)^2 + (|D - (n.D) n| - R)^2. */
export function pointCircleDistance(p: ArrayLike<number>, c: ArrayLike<number>, n: ArrayLike<number>, R: number): number {
  const D = [p[0]! - c[0]!, p[1]! - c[1]!, p[2]! - c[2]!];
  const ln = Math.hypot(n[0]!, n[1]!, n[2]!);
  const h = (D[0]! * n[0]! + D[1]! * n[1]! + D[2]! * n[2]!) / ln;
  const rad = Math.hypot(D[0]! - (h * n[0]!) / ln, D[1]! - (h * n[1]!) / ln, D[2]! - (h * n[2]!) / ln);
  return Math.hypot(h, rad - R);
}
