// Expand a periodic (weave) result into a block of cells, so the report, meshes and tracks can show several
// repeats: the block is an ordinary finite result (rings, linking, contacts) re-verified as a whole.
import { verifyConfiguration } from '../check/verify.js';
import { blockLinking, blockShifts, expandCells, latticeOffset } from '../model/periodic.js';
import { InputError } from '../model/errors.js';
import type { ResultContact, ResultRing, SolveResult } from '../model/result.js';
import type { Vec3 } from '../model/types.js';
import type { PeriodicSolveResult } from '../optimize/run/multistart.js';

/** Largest number of cells per lattice direction; the block must also stay within MAX_BLOCK_RINGS. */
export const MAX_REPEATS = 256;
/**
 * Largest block in rings: the independent check of a block costs O(N) for a weave (its sphere prefilter) and the
 * result file holds an N x N linking matrix (1024 rings: about 1 M entries, a few MB of JSON).
 */
export const MAX_BLOCK_RINGS = 1024;

export interface RepeatedResult extends PeriodicSolveResult {
  periodic: PeriodicSolveResult['periodic'] & {
    /** Cells per lattice direction in `rings` (the block); the cell is cellRings rings. */
    repeats: number[];
  };
}

/**
 * The block of `repeats` cells per lattice direction: ring i of cell s is named "A[s]"; contacts whose
 * partner copy lies inside the block are kept, with forces renormalised to sum to 1. The result keeps
 * the cell's tube, aspect ratio, lattice and figures; `verification` is redone on the block.
 */
export function repeatResult(result: PeriodicSolveResult, repeats: number): RepeatedResult {
  if (!Number.isInteger(repeats) || repeats < 1 || repeats > MAX_REPEATS) {
    throw new InputError(`--repeats: ${repeats} must be a whole number from 1 to ${MAX_REPEATS} (cells per lattice direction, for example --repeats 3)`);
  }
  const m = result.rings.length;
  const counts = result.lattice.vectors.map(() => repeats);
  const blockRings = m * repeats ** counts.length;
  if (blockRings > MAX_BLOCK_RINGS) {
    const most = Math.floor((MAX_BLOCK_RINGS / m) ** (1 / counts.length));
    throw new InputError(`--repeats: ${repeats} cells per direction make ${blockRings} rings, above the limit of ${MAX_BLOCK_RINGS} rings per block; use --repeats ${most} or fewer`);
  }
  const cells = blockShifts(counts);
  const vectors = result.lattice.vectors;
  const images = expandCells(result.rings.map((r) => ({ name: r.name, center: r.center, normal: r.normal, radius: r.radius })), result.lattice, counts);
  const rings: ResultRing[] = images.map((r, k) => ({ ...result.rings[k % m]!, name: r.name, center: r.center, normal: r.normal }));
  const cellIndex = new Map(cells.map((s, c) => [s.join(','), c]));
  const contacts: ResultContact[] = [];
  cells.forEach((s, c) => {
    const off = latticeOffset(vectors, s);
    result.contacts.forEach((k, q) => {
      const sh = result.periodic.contactShifts[q] ?? s.map(() => 0);
      const partner = cellIndex.get(s.map((x, d) => x + sh[d]!).join(','));
      if (partner === undefined) return;
      contacts.push({ ...k, a: c * m + k.a, b: partner * m + k.b, onA: shift(k.onA, off), onB: shift(k.onB, off) });
    });
  });
  const total = contacts.reduce((sum, k) => sum + k.force, 0);
  for (const k of contacts) k.force = total > 0 ? k.force / total : 0;
  const linking = blockLinking(m, result.periodic.links, counts);
  const tubeRatios = cells.flatMap(() => result.tubeRatios);
  const v = verifyConfiguration({ rings, tube: result.tube, tubeRatios, linking });
  return {
    ...result,
    // The block repeats with the cell's vectors times the repeats: periodic analyses (play) then see the
    // block's own copies, not copies one cell away that would overlap the block's rings.
    lattice: { ...result.lattice, vectors: vectors.map((v, d) => [v[0]! * counts[d]!, v[1]! * counts[d]!, v[2]! * counts[d]!] as Vec3) },
    rings,
    tubeRatios,
    linking,
    contacts,
    verification: { ...v, messages: [`block of ${counts.join(' x ')} cells (${rings.length} rings) re-checked as a whole`, ...v.messages] },
    // Every listed contact now joins two listed rings.
    periodic: { ...result.periodic, contactShifts: contacts.map(() => counts.map(() => 0)), repeats: counts },
  };
}

function shift(p: ArrayLike<number>, off: Vec3): Vec3 {
  return [p[0]! + off[0], p[1]! + off[1], p[2]! + off[2]];
}

/** Cells per lattice direction in the block that finite views of a weave cell use (tracks, meshes). */
export const VIEW_REPEATS = 3;

/** True for a weave cell result (contacts with copies of its rings in other cells), not yet a block. */
export function isWeaveCell(result: SolveResult): boolean {
  const p = (result as Partial<PeriodicSolveResult>).periodic;
  return result.lattice !== undefined && p !== undefined && (p as { repeats?: unknown }).repeats === undefined;
}

/**
 * A weave cell as a block of VIEW_REPEATS cells per lattice direction, so every contact joins two listed
 * rings; any other result unchanged.
 */
export function finiteView(result: SolveResult): { result: SolveResult; repeats: number | null } {
  if (!isWeaveCell(result)) return { result, repeats: null };
  return { result: repeatResult(result as PeriodicSolveResult, VIEW_REPEATS), repeats: VIEW_REPEATS };
}
