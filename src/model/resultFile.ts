// Reading result files (format thickring-result/1) at a boundary: every field the downstream
// commands (report, fabricate, tracks, play) use is checked here, with a message that names the
// file, the field, what was expected and the fix.
import { Ajv2020 } from 'ajv/dist/2020.js';
import type { ValidateFunction } from 'ajv';
import resultSchema from '../../schemas/result.schema.json' with { type: 'json' };
import { displayName, firstUnsafeChar, safeLine } from './displayName.js';
import { readJsonFile } from './jsonFile.js';
import { InputError } from './errors.js';
import { MAX_MAGNITUDE, MAX_MAGNITUDE_TEXT, MIN_LENGTH, MIN_RADIUS_REL, show as showValue } from './validate.js';
import { RESULT_FORMAT, type ResultContact, type ResultRing, type SolveResult } from './result.js';
import type { SolveStatus, Vec3 } from './types.js';

const STATUSES: readonly SolveStatus[] = ['optimal', 'stalled', 'infeasible', 'failed'];
/** A normal shorter than this (relative to 1) cannot define a ring plane. */
const MIN_NORMAL_LENGTH = 1e-12;

/**
 * Read and validate a result file. Checked: `format` (exactly "thickring-result/1"), `status`,
 * `tube`, `rings` (name, centre, non-zero normal, radius > 0, tube >= 0, all finite),
 * `contacts` (ring indices in range, points, distance, force), `units`, and `linking` when present.
 * Returned ring normals are scaled to unit length; everything else is as stored.
 */
export function readResultFile(path: string): SolveResult {
  const data = readJsonFile(path, 'result', `expected format "${RESULT_FORMAT}" written by thickring inflate/compare -o`);
  return parseResult(data, path);
}

/** Validate an already-parsed result object; `source` names it in messages (a path or "input"). */
export function parseResult(data: unknown, source: string): SolveResult {
  const where = `result file '${source}'`;
  if (!isObject(data)) {
    throw new InputError(`${where} is not a JSON object: expected format "${RESULT_FORMAT}" written by thickring inflate/compare -o`);
  }
  checkFormat(data['format'], where);
  const status = data['status'];
  if (typeof status !== 'string' || !STATUSES.includes(status as SolveStatus)) {
    throw new InputError(`${where}: status ${show(status)} must be one of ${STATUSES.join(', ')}: re-run the solve`);
  }
  const tube = finite(data['tube'], `${where}: tube`);
  if (tube < 0) throw new InputError(`${where}: tube ${tube} must be >= 0: re-run the solve`);
  const units = data['units'];
  if (units !== undefined && units !== null && typeof units !== 'string') {
    throw new InputError(`${where}: units ${show(units)} must be a string or null (e.g. "mm")`);
  }
  const rings = checkRings(data['rings'], where);
  const contacts = checkContacts(data['contacts'], rings.length, where, contactShifts(data));
  if (data['linking'] !== undefined) checkLinking(data['linking'], rings.length, where);
  checkSchema(data, where);
  return { ...(data as unknown as SolveResult), units: (units ?? null) as string | null, rings, contacts };
}

function checkFormat(format: unknown, where: string): void {
  if (format === RESULT_FORMAT) return;
  if (typeof format === 'string' && format.startsWith('thickring-result/')) {
    throw new InputError(
      `${where} has format version '${format}'; this thickring reads format "${RESULT_FORMAT}": re-run the solve with this version`,
    );
  }
  if (format === undefined) {
    throw new InputError(
      `${where} has no 'format' field (from another tool?): expected format "${RESULT_FORMAT}" written by thickring inflate/compare -o`,
    );
  }
  throw new InputError(
    `${where} has format ${show(format)}: expected format "${RESULT_FORMAT}" written by thickring inflate/compare -o`,
  );
}

function checkRings(value: unknown, where: string): ResultRing[] {
  if (!Array.isArray(value) || value.length === 0) {
    throw new InputError(`${where}: rings must be a non-empty array of {name, center, normal, radius, tube}`);
  }
  return value.map((raw: unknown, i: number): ResultRing => {
    const label = `${where}: rings[${i}]`;
    if (!isObject(raw)) throw new InputError(`${label} must be an object {name, center, normal, radius, tube}`);
    const name = raw['name'];
    if (typeof name !== 'string' || name.length === 0) {
      throw new InputError(`${label}: name ${show(name)} must be a non-empty string`);
    }
    const bad = firstUnsafeChar(name);
    if (bad !== null) throw new InputError(`${label}: name ${show(name)} holds the control character ${bad}: rename the ring`);
    const ringLabel = `${where}: ring ${displayName(name)}`;
    const center = vec3(raw['center'], `${ringLabel}: center`);
    const normal = vec3(raw['normal'], `${ringLabel}: normal`);
    const len = Math.hypot(normal[0], normal[1], normal[2]);
    if (!(len > MIN_NORMAL_LENGTH)) {
      throw new InputError(`${ringLabel}: normal [${normal.join(', ')}] must be non-zero: give the ring's axis direction`);
    }
    const radius = finite(raw['radius'], `${ringLabel}: radius`);
    if (!(radius > 0)) throw new InputError(`${ringLabel}: radius ${radius} must be > 0`);
    if (radius < MIN_LENGTH || radius > MAX_MAGNITUDE) {
      throw new InputError(`${ringLabel}: radius ${radius} is outside the range ${MIN_LENGTH} to ${MAX_MAGNITUDE_TEXT} layout units: re-run the solve from a layout in range`);
    }
    const far = Math.max(Math.abs(center[0]), Math.abs(center[1]), Math.abs(center[2]));
    if (radius < MIN_RADIUS_REL * far) {
      throw new InputError(`${ringLabel}: radius ${radius} is below ${MIN_RADIUS_REL} times its centre coordinate ${far}: move the layout nearer the origin`);
    }
    const tube = finite(raw['tube'], `${ringLabel}: tube`);
    if (tube < 0) throw new InputError(`${ringLabel}: tube ${tube} must be >= 0`);
    if (tube > MAX_MAGNITUDE) throw new InputError(`${ringLabel}: tube ${tube} is above ${MAX_MAGNITUDE_TEXT} layout units: re-run the solve`);
    const ar = raw['aspectRatio'];
    const aspectRatio = typeof ar === 'number' && Number.isFinite(ar) ? ar : tube > 0 ? (radius - tube) / tube : Infinity;
    return { ...(raw as object), name, center, normal: [normal[0] / len, normal[1] / len, normal[2] / len], radius, tube, aspectRatio };
  });
}

// A weave cell result lists contacts with copies of its rings in other cells (periodic.contactShifts[k], lattice
// steps); such a contact may join a ring to its own copy.
function contactShifts(data: Record<string, unknown>): unknown[] | null {
  const p = data['periodic'];
  if (!isObject(p) || !isObject(data['lattice'])) return null;
  return Array.isArray(p['contactShifts']) ? p['contactShifts'] : null;
}

function checkContacts(value: unknown, count: number, where: string, shifts: unknown[] | null): ResultContact[] {
  if (!Array.isArray(value)) {
    throw new InputError(`${where}: contacts must be an array of {a, b, onA, onB, distance, force} (may be empty)`);
  }
  return value.map((raw: unknown, k: number): ResultContact => {
    const label = `${where}: contacts[${k}]`;
    if (!isObject(raw)) throw new InputError(`${label} must be an object {a, b, onA, onB, distance, force}`);
    const a = raw['a'], b = raw['b'];
    for (const [key, v] of [['a', a], ['b', b]] as const) {
      if (!Number.isInteger(v) || (v as number) < 0 || (v as number) >= count) {
        throw new InputError(`${label}: ${key} ${show(v)} must be a ring index 0..${count - 1}`);
      }
    }
    const sh = shifts?.[k];
    const shifted = Array.isArray(sh) && sh.some((x) => typeof x === 'number' && x !== 0);
    if (a === b && !shifted) throw new InputError(`${label}: a and b are both ${String(a)}; a contact joins two different rings (or a ring and its copy in another cell)`);
    const onA = vec3(raw['onA'], `${label}: onA`);
    const onB = vec3(raw['onB'], `${label}: onB`);
    const distance = finite(raw['distance'], `${label}: distance`);
    if (distance < 0) throw new InputError(`${label}: distance ${distance} must be >= 0`);
    const force = finite(raw['force'], `${label}: force`);
    const contact: ResultContact = { ...(raw as object), a: a as number, b: b as number, onA, onB, distance, force };
    const cont = raw['continuum'];
    if (cont !== undefined && typeof cont !== 'boolean') throw new InputError(`${label}: continuum must be true or false`);
    return contact;
  });
}

function checkLinking(value: unknown, count: number, where: string): void {
  const ok =
    Array.isArray(value) &&
    value.length === count &&
    value.every((row) => Array.isArray(row) && row.length === count && row.every((x) => x === -1 || x === 0 || x === 1));
  if (!ok) throw new InputError(`${where}: linking must be a ${count} x ${count} matrix of -1, 0 or 1`);
}

function vec3(value: unknown, label: string): Vec3 {
  if (!Array.isArray(value) || value.length !== 3 || !value.every((x) => typeof x === 'number' && Number.isFinite(x))) {
    throw new InputError(`${label} ${show(value)} must be an array of 3 finite numbers`);
  }
  if (!value.every((x) => Math.abs(x as number) <= MAX_MAGNITUDE)) {
    throw new InputError(`${label} ${show(value)} has an entry beyond ±${MAX_MAGNITUDE_TEXT} layout units: re-run the solve from a layout in range`);
  }
  return [value[0] as number, value[1] as number, value[2] as number];
}

function finite(value: unknown, label: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) throw new InputError(`${label} ${show(value)} must be a finite number`);
  return value;
}

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

function show(v: unknown): string {
  return v === undefined ? 'missing' : showValue(v);
}

let schemaCheck: ValidateFunction | null = null;

/**
 * Everything else the published schema (schemas/result.schema.json) states, so that reader and schema agree:
 * the first violation becomes one line naming the field.
 */
function checkSchema(data: unknown, where: string): void {
  schemaCheck ??= new Ajv2020({ allErrors: false, strict: false }).compile(resultSchema);
  if (schemaCheck(data)) return;
  const e = schemaCheck.errors?.[0];
  const field = e ? e.instancePath.replace(/^\//, '').replace(/\//g, '.') || 'the top level' : 'the file';
  const detail = e ? `${e.message ?? 'is not valid'}${e.params && 'allowedValues' in e.params ? ` (${showValue(e.params['allowedValues'])})` : ''}` : 'is not valid';
  throw new InputError(safeLine(`${where}: ${field} ${detail} (schemas/result.schema.json): re-run the solve that wrote it`));
}
