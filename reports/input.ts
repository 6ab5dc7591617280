// The result file a report is built from: read and checked by the shared reader, plus what only the
// report needs — the two optima and the curve of a compare result — and safe defaults for the
// optional sections a hand-edited or older file may lack, so a report never half-renders.
import { readFileSync } from 'node:fs';
import { InputError } from '../src/model/errors.js';
import { parseResult, readResultFile } from '../src/model/resultFile.js';
import type { Certificate, CompareResult, SolveResult, Verification } from '../src/model/result.js';

/** Read RESULT.json for `thickring report`: InputError (exit 2) for anything it cannot show. */
export function readReportInput(path: string): SolveResult | CompareResult {
  const result = withDefaults(readResultFile(path));
  // The shared reader keeps unknown keys as stored: re-read the raw nested optima to check them too.
  const raw = JSON.parse(readFileSync(path, 'utf8')) as Record<string, unknown>;
  const hasCompare = raw['symmetric'] !== undefined || raw['broken'] !== undefined || result.command === 'compare';
  if (!hasCompare) return result;
  const where = `result file '${path}'`;
  if (raw['symmetric'] === undefined || raw['broken'] === undefined) {
    throw new InputError(`${where}: a compare result needs both "symmetric" and "broken" sections: re-run thickring compare -o`);
  }
  const symmetric = withDefaults(parseResult(raw['symmetric'], `${path} (symmetric)`));
  const broken = withDefaults(parseResult(raw['broken'], `${path} (broken)`));
  const sweep = raw['sweep'] ?? [];
  if (!Array.isArray(sweep) || !sweep.every((p) => isObject(p) && typeof p['epsilon'] === 'number' && typeof p['tube'] === 'number')) {
    throw new InputError(`${where}: sweep must be an array of {epsilon, tube, status}: re-run thickring compare -o`);
  }
  const changes = raw['changes'] ?? [];
  if (!Array.isArray(changes) || !changes.every((c) => isObject(c) && typeof c['name'] === 'string')) {
    throw new InputError(`${where}: changes must be an array of {name, displacement, tiltDegrees}: re-run thickring compare -o`);
  }
  const num = (v: unknown): number => (typeof v === 'number' ? v : NaN);
  return {
    ...result,
    symmetric,
    broken,
    gain: num(raw['gain']),
    gainPercent: num(raw['gainPercent']),
    changes: changes as CompareResult['changes'],
    sweep: (sweep as Record<string, unknown>[]).map((p) => ({
      epsilon: p['epsilon'] as number,
      tube: p['tube'] as number,
      status: typeof p['status'] === 'string' ? (p['status'] as CompareResult['sweep'][number]['status']) : 'failed',
    })),
  };
}

/** Fill the optional sections the report reads (starts, certificate, verification, bound, figures). */
export function withDefaults(r: SolveResult): SolveResult {
  const certDefaults: Certificate = { method: 'unknown', balanceResidual: NaN, maxViolation: NaN, activeStruts: 0, certified: false, note: '' };
  const checkDefaults: Verification = { ok: false, minClearance: NaN, linkingPreserved: false, tubeWithinRadius: false, messages: [] };
  const certificate: Certificate = isObject(r.certificate)
    ? { ...certDefaults, ...(r.certificate as Partial<Certificate>) }
    : { method: 'none', balanceResidual: NaN, maxViolation: NaN, activeStruts: 0, certified: false, note: 'no certificate in the file' };
  const verification: Verification = isObject(r.verification)
    ? { ...checkDefaults, ...(r.verification as Partial<Verification>), messages: Array.isArray(r.verification.messages) ? r.verification.messages.map(String) : [] }
    : { ok: false, minClearance: NaN, linkingPreserved: false, tubeWithinRadius: false, messages: ['no independent check in the file'] };
  const minR = Math.min(...r.rings.map((g) => g.radius));
  return {
    ...r,
    command: typeof r.command === 'string' ? r.command : 'inflate',
    spec: typeof r.spec === 'string' ? r.spec : '(unnamed)',
    tubeOverCore: typeof r.tubeOverCore === 'number' ? r.tubeOverCore : r.tube / minR,
    aspectRatio: typeof r.aspectRatio === 'number' ? r.aspectRatio : Math.min(...r.rings.map((g) => g.aspectRatio)),
    symmetry: isObject(r.symmetry) ? r.symmetry : null,
    bound: isObject(r.bound) ? r.bound : null,
    starts: Array.isArray(r.starts) ? r.starts.filter(isObject).map((s) => ({
      seed: Number(s.seed) || 0, status: s.status, tube: Number(s.tube), iterations: Number(s.iterations) || 0,
      history: Array.isArray(s.history) ? s.history.map(Number) : [], retries: Number(s.retries) || 0,
    })) : [],
    certificate,
    verification,
    elapsedSeconds: typeof r.elapsedSeconds === 'number' ? r.elapsedSeconds : NaN,
  };
}

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}
