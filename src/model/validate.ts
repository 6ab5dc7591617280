// Field readers for JSON input at a boundary. Each failure throws InputError with one line that
// names where the value sits, what was expected, what was found, and the fix.
import { InputError } from './errors.js';
import type { Vec3 } from './types.js';

/** A direction whose largest component is at or below this (subnormal range) counts as the zero vector. */
export const ZERO_VECTOR_ABS = 1e-300;

/** Where a value sits, e.g. "ring B" or "symmetry", and the file it came from. */
export interface Where {
  owner: string;
  source: string;
}

export function fail(at: Where, message: string, fix: string): never {
  throw new InputError(`${at.owner}: ${message} (in ${at.source}); ${fix}`);
}

/** Short, single-line rendering of a bad value for messages. */
export function show(v: unknown): string {
  if (v === undefined) return 'nothing';
  if (typeof v === 'number') return Number.isNaN(v) ? 'NaN' : String(v);
  let s: string;
  try {
    s = JSON.stringify(v) ?? String(v);
  } catch {
    s = String(v);
  }
  return s.length > 60 ? `${s.slice(0, 57)}...` : s;
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
  return x;
}

export function readVec3(v: unknown, at: Where, field: string): Vec3 {
  if (!Array.isArray(v) || v.length !== 3) {
    const got = Array.isArray(v) ? `${v.length} entries` : show(v);
    fail(at, `${field} must be an array of 3 numbers [x, y, z] (got ${got})`, `write ${field} as [x, y, z]`);
  }
  return [readFinite(v[0], at, `${field}[0]`), readFinite(v[1], at, `${field}[1]`), readFinite(v[2], at, `${field}[2]`)];
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
  return v;
}
