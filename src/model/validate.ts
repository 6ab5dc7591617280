// Field readers for JSON input at a boundary. Each failure throws InputError with one line that
// names where the value sits, what was expected, what was found, and the fix.
import { InputError } from './errors.js';
import type { Vec3 } from './types.js';
import { firstUnsafeChar, safeLine } from './displayName.js';

/** A direction whose largest component is at or below this (subnormal range) counts as the zero vector. */
export const ZERO_VECTOR_ABS = 1e-300;

/**
 * Largest |coordinate|, core radius or tube accepted in an input file (layout units). Squared distances then
 * stay below ~1.2e31 and the kernel's degree-8 terms below ~1e125, far from overflow, while a millimetre layout
 * may still span a million kilometres.
 */
export const MAX_MAGNITUDE = 1e15;
/** MAX_MAGNITUDE as messages print it. */
export const MAX_MAGNITUDE_TEXT = '1e15';
/** Smallest core radius or tube accepted (layout units): its eighth power (~1e-120) stays far from underflow. */
export const MIN_LENGTH = 1e-15;
/**
 * Smallest core radius relative to the largest |centre coordinate| of the file. Below it, rounding the centre
 * to a double alone moves the ring by more than ~1e-6 of its radius, and its distances are noise.
 */
export const MIN_RADIUS_REL = 1e-10;

/** Where a value sits, e.g. "ring B" or "symmetry", and the file it came from. */
export interface Where {
  owner: string;
  source: string;
}

export function fail(at: Where, message: string, fix: string): never {
  throw new InputError(safeLine(`${at.owner}: ${message} (in ${at.source}); ${fix}`));
}

/** Longest rendering of a bad value in a message (characters). */
const SHOW_MAX = 60;
/** Nesting shown before "..." (rendering never recurses deeper, so hostile nesting cannot exhaust the stack). */
const SHOW_DEPTH = 4;

/** Short, single-line rendering of a bad value for messages; control characters escaped. */
export function show(v: unknown): string {
  if (v === undefined) return 'nothing';
  if (typeof v === 'number') return Number.isNaN(v) ? 'NaN' : String(v);
  const s = safeLine(render(v, SHOW_DEPTH, SHOW_MAX + 1));
  return s.length > SHOW_MAX ? `${s.slice(0, SHOW_MAX - 3)}...` : s;
}

/** JSON-like text of `v`, at most about `budget` characters and `depth` levels (bounded work and recursion). */
function render(v: unknown, depth: number, budget: number): string {
  if (v === null || typeof v === 'boolean' || typeof v === 'number') return String(v);
  if (typeof v === 'string') return JSON.stringify(v.length > budget ? v.slice(0, budget) : v);
  if (typeof v !== 'object') return String(v);
  if (depth <= 0) return Array.isArray(v) ? '[...]' : '{...}';
  const parts: string[] = [];
  let used = 2;
  const entries: [string | null, unknown][] = Array.isArray(v)
    ? v.slice(0, budget).map((x) => [null, x])
    : Object.keys(v).slice(0, budget).map((k) => [k, (v as Record<string, unknown>)[k]]);
  for (const [k, x] of entries) {
    if (used >= budget) {
      parts.push('...');
      break;
    }
    const item = (k === null ? '' : `${JSON.stringify(k)}:`) + render(x, depth - 1, budget - used);
    parts.push(item);
    used += item.length + 1;
  }
  return Array.isArray(v) ? `[${parts.join(',')}]` : `{${parts.join(',')}}`;
}

export function isPlainObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

export function readObject(v: unknown, at: Where, field: string, example: string): Record<string, unknown> {
  if (!isPlainObject(v)) fail(at, `${field} must be an object like ${example} (got ${show(v)})`, `write ${field} as ${example}`);
  return v;
}

/** Reject keys the format does not define: a misspelt optional key would otherwise be ignored silently. */
export function rejectUnknownKeys(obj: Record<string, unknown>, known: readonly string[], at: Where): void {
  for (const k of Object.keys(obj)) {
    if (!known.includes(k)) {
      fail(at, `unknown key "${k}"`, `remove it or fix its spelling (known keys: ${known.join(', ')})`);
    }
  }
}

export function readFinite(v: unknown, at: Where, field: string): number {
  if (typeof v !== 'number' || !Number.isFinite(v)) {
    const what = typeof v === 'number' ? show(v) : `${typeof v === 'string' ? 'string ' : ''}${show(v)}`;
    fail(at, `${field} must be a finite number (got ${what})`, `give ${field} as a plain decimal number`);
  }
  return v;
}

export function readPositive(v: unknown, at: Where, field: string, meaning: string): number {
  const x = readFinite(v, at, field);
  if (!(x > 0)) fail(at, `${field} ${show(x)} must be > 0`, `give the ${meaning} as a positive number`);
  if (x < MIN_LENGTH || x > MAX_MAGNITUDE) {
    fail(at, `${field} ${show(x)} is outside the range ${MIN_LENGTH} to ${MAX_MAGNITUDE_TEXT} layout units`,
      `give the ${meaning} in a unit that puts it in range (e.g. mm instead of m)`);
  }
  return x;
}

/** |x| <= MAX_MAGNITUDE for a coordinate or vector entry. */
function readBounded(v: unknown, at: Where, field: string): number {
  const x = readFinite(v, at, field);
  if (Math.abs(x) > MAX_MAGNITUDE) {
    fail(at, `${field} ${show(x)} is beyond ±${MAX_MAGNITUDE_TEXT} layout units`, 'move the layout nearer the origin or use a larger unit');
  }
  return x;
}

export function readVec3(v: unknown, at: Where, field: string): Vec3 {
  if (!Array.isArray(v) || v.length !== 3) {
    const got = Array.isArray(v) ? `${v.length} entries` : show(v);
    fail(at, `${field} must be an array of 3 numbers [x, y, z] (got ${got})`, `write ${field} as [x, y, z]`);
  }
  return [readBounded(v[0], at, `${field}[0]`), readBounded(v[1], at, `${field}[1]`), readBounded(v[2], at, `${field}[2]`)];
}

/** A direction: a non-zero 3-vector, returned with unit length. */
export function readDirection(v: unknown, at: Where, field: string): Vec3 {
  const d = readVec3(v, at, field);
  // Scale first so tiny but valid vectors (1e-200) normalise without underflow.
  const m = Math.max(Math.abs(d[0]), Math.abs(d[1]), Math.abs(d[2]));
  if (!(m > ZERO_VECTOR_ABS)) fail(at, `${field} ${show(d)} is the zero vector`, `give a non-zero direction such as [0, 0, 1]`);
  const s: Vec3 = [d[0] / m, d[1] / m, d[2] / m];
  const l = Math.hypot(s[0], s[1], s[2]);
  return [s[0] / l, s[1] / l, s[2] / l];
}

export function readName(v: unknown, at: Where, field: string): string {
  if (typeof v !== 'string' || v.trim() === '') {
    fail(at, `${field} must be a non-empty string (got ${show(v)})`, `give each ring a short unique name such as "A"`);
  }
  readPlainText(v, at, field, 'give each ring a short unique name such as "A"');
  return v;
}

/**
 * Text echoed in messages and tables (names, units) may not hold control, line-separator or bidi
 * formatting characters: they would drive the terminal or split a one-line message.
 */
export function readPlainText(v: string, at: Where, field: string, fix: string): string {
  const bad = firstUnsafeChar(v);
  if (bad !== null) fail(at, `${field} ${show(v)} holds the control character ${bad}`, fix);
  return v;
}
