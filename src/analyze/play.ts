// "Locked or rattling?" for a solved ring set: first-order mobility (LPs on the exact contacts), the
// second-order test of every flex (escape, or locked by a self-stress), and the finite play of each ring.
import { InputError } from '../model/errors.js';
import type { ResultRing, SolveResult } from '../model/result.js';
import type { SolveStatus, Vec3 } from '../model/types.js';
import { firstOrderMobility, type FirstOrder } from './mobility.js';
import { expandFree, fromRigid, ringMotion, type MotionFrame, type RingPose } from './mobilityMotion.js';
import { secondOrderAlong, secondOrderSearch, velocities, type PairSecondOrder, type SecondOrderReport } from './mobilitySecondOrder.js';
import { finitePlay, type PlayTable } from './finitePlay.js';
import { copyName } from './mobilityPairs.js';

export const PLAY_FORMAT = 'thickring-play/1';

export interface PlayAnalysisOptions {
  /** Common tube radius to analyse (layout units); default the result's own. Ring i gets tube * ratio_i. */
  tube?: number;
  /** Contacts with clearance <= activeTol are active (layout units); default 1e-6 x the tube. */
  activeTol?: number;
  /** Largest translation searched by the finite play (layout units). */
  translationCap?: number;
  /** Called as each stage starts (one line of progress; the CLI shows it on runs longer than a second). */
  onProgress?: (stage: string) => void;
}

/** One ring's part of a described motion, per unit step (largest point displacement 1 layout unit). */
export interface RingMove {
  name: string;
  /** Translation of the centre (layout units per unit step). */
  translation: Vec3;
  /** Rotation axis (unit) and rate (degrees per unit step) about the ring's own centre, spin removed. */
  rotationAxis: Vec3;
  rotationDegrees: number;
}

export interface FreeMotion {
  /** 'reversible': both directions keep every contact to first order; 'one-way': opens some, closes none;
   * 'escape': the direction that thickens the set. */
  kind: 'reversible' | 'one-way' | 'escape';
  /** Ring held still in the description (the ring with the most contacts). */
  anchor: string;
  rings: RingMove[];
  /** Pair-level second-order check along this motion: 'closes' (blocked), 'opens', or 'keeps'. */
  secondOrder: 'closes' | 'opens' | 'keeps';
  description: string;
}

export interface PlayReport {
  format: typeof PLAY_FORMAT;
  command: 'play';
  spec: string;
  units: string | null;
  /** Solve status of the analysed result. */
  status: SolveStatus;
  /** Common tube radius analysed (layout units). */
  tube: number;
  /** The result's own common tube radius (layout units). */
  resultTube: number;
  aspectRatio: number;
  rings: ResultRing[];
  /** Locked except for spins: no first-order motion, or every first-order motion closes a contact at second order. */
  locked: boolean;
  /** How the verdict was reached. */
  lockedBy: 'first-order' | 'second-order' | null;
  /** Dimension of the first-order free motions beyond spins and whole-set motions. */
  freeDimension: number;
  reversibleDimension: number;
  freeMotions: FreeMotion[];
  mobility: {
    status: 'ok' | 'lp-failed';
    activeContacts: number;
    continua: { a: string; b: string; kind: string; sampledRing: string; samples: number }[];
    /** max over motions of the smallest first-order opening rate (dimensionless); > 0: not an optimum. */
    openingMargin: number | null;
    selfStress: boolean;
    activeTol: number;
    detail: string;
  };
  secondOrder: {
    outcome: SecondOrderReport['outcome'];
    escape: boolean;
    escapeOrder: 1 | 2 | null;
    direction: FreeMotion | null;
    /** Thicker common tube reached by following the escape (layout units), checked with the exact kernel. */
    thickenedTube: number | null;
    /** Ring poses at that point (a start for re-inflating without symmetry); null without an escape. */
    thickenedRings: { name: string; center: Vec3; normal: Vec3; radius: number }[] | null;
    stressFormEigenvalues: number[];
    pairs: PairSecondOrder[];
    detail: string;
  };
  play: PlayTable;
  notes: string[];
}

/** Active tolerance relative to the tube: optimizer output is polished to about 1e-9. */
const ACTIVE_TOL_REL = 1e-6;
/** Ring parts below this fraction of the largest one are left out of a description. */
const DESCRIBE_REL = 0.01;

export async function analyzePlay(result: SolveResult, options: PlayAnalysisOptions = {}): Promise<PlayReport> {
  const ratios = tubeRatios(result);
  const tube = options.tube ?? result.tube;
  if (!Number.isFinite(tube) || tube <= 0) {
    throw new InputError(options.tube === undefined
      ? `result tube ${result.tube} is not > 0 (solve status ${result.status}): pass --tube R to analyse the rings at a chosen tube radius`
      : `--tube ${tube} must be a number > 0 (layout units): pass a positive tube radius`);
  }
  const lattice = result.lattice ?? null;
  const rings: RingPose[] = result.rings.map((r, i) => ({
    name: r.name, center: r.center, normal: unitVec(r.normal), radius: r.radius, tube: tube * ratios[i]!,
  }));
  const activeTol = options.activeTol ?? ACTIVE_TOL_REL * Math.max(tube, 1e-300);
  const units = result.units ?? 'layout units';
  for (const r of rings) {
    if (r.tube > r.radius * (1 + 1e-12)) {
      throw new InputError(`--tube ${tube}: ring ${r.name} would get tube ${fmt(r.tube)} > its core radius ${fmt(r.radius)} ${units}: choose a smaller tube`);
    }
  }

  const progress = options.onProgress ?? (() => undefined);
  progress(`first-order mobility of ${rings.length} rings`);
  const fo = await firstOrderMobility(rings, { activeTol, lattice });
  if (fo.active.minGap < -activeTol) {
    throw new InputError(
      `--tube ${tube} ${units} makes tubes overlap by ${fmt(-fo.active.minGap)} ${units}: choose a tube <= ${fmt(tube + fo.active.minGap / 2)} (the result's is ${fmt(result.tube)})`,
    );
  }
  progress(`second-order test (${fo.active.struts.length} active contacts)`);
  const so = await secondOrderSearch(rings, fo, tube, ratios, { activeTol, lattice });
  const play = finitePlay(rings, tube, {
    touchTol: activeTol, lattice, onRing: (i, n) => progress(`play of ring ${rings[i]!.name} (${i + 1} of ${n})`), ...(options.translationCap !== undefined ? { translationCap: options.translationCap } : {}),
  });

  const anchor = anchorRing(fo);
  const along = (x: number[]): FreeMotion['secondOrder'] => {
    const a = secondOrderAlong(rings, velocities(fo.frame, x), { activeTol, lattice });
    return a.blocked ? 'closes' : a.escape ? 'opens' : 'keeps';
  };
  const freeMotions: FreeMotion[] = [
    ...fo.reversible.map((z) => {
      const x = expandFree(fo.frame, z);
      return describeMotion(rings, fo.frame, x, 'reversible', anchor, units, along(x));
    }),
    ...fo.oneWay.map((z) => {
      const x = expandFree(fo.frame, z);
      return describeMotion(rings, fo.frame, x, 'one-way', anchor, units, along(x));
    }),
  ];
  const escape = so.outcome === 'escape';
  const lockedBy = rings.length < 2 && lattice === null ? null
    : so.outcome === 'first-order-locked' ? 'first-order'
      : so.outcome === 'prestress-stable' ? 'second-order' : null;

  const notes: string[] = [];
  if (rings.length < 2 && lattice === null) notes.push('a single ring has nothing to lock against');
  if (lattice !== null) {
    notes.push('periodic weave: in the mobility and second-order tests every copy moves with its ring; in the play table one ring moves and every copy stays put');
  }
  if (fo.active.struts.length === 0) notes.push(`no contacts at tube ${fmt(tube)} ${units}: every ring can move until its play runs out`);
  if (escape && result.status === 'optimal') notes.push('the result is marked optimal, yet a motion thickens it: it is a saddle, not a maximum');
  if (fo.status !== 'ok') notes.push(`mobility LP failed: ${fo.detail}`);

  return {
    format: PLAY_FORMAT,
    command: 'play',
    spec: result.spec,
    units: result.units,
    status: result.status,
    tube,
    resultTube: result.tube,
    aspectRatio: result.aspectRatio,
    rings: result.rings,
    locked: lockedBy !== null,
    lockedBy,
    freeDimension: fo.freeDimension,
    reversibleDimension: fo.reversible.length,
    freeMotions,
    mobility: {
      status: fo.status,
      activeContacts: fo.active.struts.length,
      continua: fo.active.continua.map((c) => ({
        a: rings[c.a]!.name, b: copyName(rings[c.b]!.name, c.offset), kind: c.kind, sampledRing: rings[c.sampled]!.name, samples: c.samples,
      })),
      openingMargin: fo.openingMargin,
      selfStress: fo.stress !== null,
      activeTol,
      detail: fo.detail,
    },
    secondOrder: {
      outcome: so.outcome,
      escape,
      escapeOrder: so.escapeOrder,
      direction: so.direction === null ? null
        : describeMotion(rings, fo.frame, so.direction, escape ? 'escape' : 'reversible', anchor, units,
          so.along === null ? along(so.direction) : so.along.blocked ? 'closes' : so.along.escape ? 'opens' : 'keeps'),
      thickenedTube: so.thickenedTube,
      thickenedRings: so.thickenedRings === null ? null
        : so.thickenedRings.map((r) => ({ name: r.name, center: r.center, normal: r.normal, radius: r.radius })),
      stressFormEigenvalues: so.stressFormEigenvalues,
      pairs: so.along?.pairs ?? [],
      detail: so.detail,
    },
    play,
    notes,
  };
}

/** r_i / tube for each ring, from the result (tubeRatios, else ring tube over common tube, else 1). */
export function tubeRatios(result: SolveResult): number[] {
  return result.rings.map((r, i) => {
    const given = result.tubeRatios?.[i];
    if (typeof given === 'number' && Number.isFinite(given) && given > 0) return given;
    if (result.tube > 0 && Number.isFinite(r.tube) && r.tube > 0) return r.tube / result.tube;
    return 1;
  });
}

/**
 * Put a reduced motion x into words, with the anchor ring held still (the whole-set motion that cancels
 * the anchor's own motion is subtracted, which changes nothing physical).
 */
export function describeMotion(
  rings: readonly RingPose[], frame: MotionFrame, x: number[], kind: FreeMotion['kind'], anchor: number, units: string,
  secondOrder: FreeMotion['secondOrder'],
): FreeMotion {
  const rel = relativeTo(rings, frame, x, anchor);
  const moves = rings.map((r, i) => {
    const { v, omega } = ringMotion(frame, rel, i);
    return { r, v, omega, size: Math.hypot(...v) + r.radius * Math.hypot(...omega) };
  });
  const biggest = Math.max(...moves.map((m) => m.size), 0);
  const ringsOut: RingMove[] = moves.map(({ r, v, omega }) => {
    const k = biggest > 0 ? 1 / biggest : 0;
    const rate = Math.hypot(...omega) * k;
    return {
      name: r.name,
      translation: [v[0] * k, v[1] * k, v[2] * k],
      rotationAxis: rate > 0 ? unitVec(omega) : [0, 0, 0],
      rotationDegrees: (rate * 180) / Math.PI,
    };
  });
  const parts: string[] = [];
  ringsOut.forEach((m, i) => {
    const t = Math.hypot(...m.translation);
    const turn = (m.rotationDegrees * Math.PI) / 180 * rings[i]!.radius;
    const bits: string[] = [];
    if (t > DESCRIBE_REL) bits.push(`translates ${fmt(t)} ${units} along ${axisName(unitVec(m.translation))}`);
    if (turn > DESCRIBE_REL) bits.push(`tilts ${fmt(m.rotationDegrees)}° about ${axisName(m.rotationAxis)} through its centre`);
    if (bits.length > 0) parts.push(`ring ${m.name} ${bits.join(' while it ')}`);
  });
  const how = kind === 'reversible' ? 'both ways' : kind === 'one-way' ? 'one way only' : 'escape';
  const bent = secondOrder !== 'closes' && kind === 'reversible' ? ' (with a second-order correction where one is needed)' : '';
  const second = kind === 'escape'
    ? (secondOrder === 'opens' ? 'every contact opens (with its second-order correction, where one is needed)'
      : 'the pair-level check along it is inconclusive')
    : secondOrder === 'closes' ? 'closes a contact at second order (blocked)'
      : secondOrder === 'opens' ? `opens every contact at second order${bent}` : `keeps the contacts to second order${bent}`;
  const description = parts.length === 0
    ? `(${how}) no ring moves relative to ring ${rings[anchor]!.name}`
    : `(${how}; ring ${rings[anchor]!.name} held still; per unit step) ${parts.join('; ')}; ${second}`;
  return { kind, anchor: rings[anchor]!.name, rings: ringsOut, secondOrder, description };
}

/** x minus the whole-set motion that equals the anchor ring's own motion. */
function relativeTo(rings: readonly RingPose[], frame: MotionFrame, x: number[], anchor: number): number[] {
  if (rings.length === 0) return x;
  const { v, omega } = ringMotion(frame, x, anchor);
  const c = rings[anchor]!.center;
  const arm: Vec3 = [c[0] - frame.centroid[0], c[1] - frame.centroid[1], c[2] - frame.centroid[2]];
  // A whole-set rotation Ω about the centroid moves the anchor's centre by Ω × arm.
  const t: Vec3 = [
    v[0] - (omega[1] * arm[2] - omega[2] * arm[1]),
    v[1] - (omega[2] * arm[0] - omega[0] * arm[2]),
    v[2] - (omega[0] * arm[1] - omega[1] * arm[0]),
  ];
  const rigid = fromRigid(frame, rings, t, omega);
  return x.map((xi, k) => xi - rigid[k]!);
}

/** The ring with the most active contacts (first on ties). */
function anchorRing(fo: FirstOrder): number {
  const count = new Array<number>(fo.frame.rings).fill(0);
  for (const s of fo.active.struts) {
    count[s.a]!++;
    count[s.b]!++;
  }
  let best = 0;
  count.forEach((c, i) => { if (c > count[best]!) best = i; });
  return best;
}

export function axisName(u: Vec3): string {
  const names = ['x', 'y', 'z'];
  for (let k = 0; k < 3; k++) {
    if (Math.abs(Math.abs(u[k]!) - 1) < 1e-6) return `${u[k]! > 0 ? '+' : '-'}${names[k]}`;
  }
  return `(${u.map((c) => (Math.abs(c) < 5e-4 ? 0 : c).toFixed(3)).join(', ')})`;
}

export function fmt(v: number): string {
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e4 || a < 1e-3) return v.toExponential(3);
  const p = v.toPrecision(4);
  return p.includes('.') ? p.replace(/\.?0+$/, '') : p;
}

function unitVec(v: ArrayLike<number>): Vec3 {
  const l = Math.hypot(v[0]!, v[1]!, v[2]!);
  return l > 0 ? [v[0]! / l, v[1]! / l, v[2]! / l] : [0, 0, 0];
}

