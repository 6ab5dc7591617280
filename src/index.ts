// Public library API: re-exports only.
export * from './model/types.js';
export * from './model/result.js';
export { InputError } from './model/errors.js';
export { parseLayout, layoutFromRings, LAYOUT_FORMAT } from './model/layout.js';
export { readResultFile, parseResult } from './model/resultFile.js';
export {
  ringDistance, circleContacts, closestPointOnCircle, pointCircleDistance, strutGradient,
  CONTACT_STRIDE, MAX_CONTACTS, type RingDistance, type Contact, type ContinuumKind,
} from './kernel/index.js';
export { linkingNumber, linkingMatrix, connectedness } from './topology/index.js';
export { measureLayout } from './analyze/measure.js';
export * as fabricate from './fabricate/index.js';
export { catalogLayout, catalogEntries, naturalSymmetry } from './model/catalog.js';
export { resolveSpec } from './model/spec.js';
export { parseSymmetryOption, symmetrize, symmetryDeparture } from './model/symmetry.js';
export { solveInflate } from './optimize/run/solve.js';
export { runMultistart } from './optimize/run/multistart.js';
export { packingBound, packingRadius } from './optimize/certify/bound.js';
export { verifyConfiguration } from './check/verify.js';
export { compare } from './analyze/compare.js';
export { symmetryBreakingSweep } from './analyze/sweep.js';
export { analyzePlay, type PlayReport } from './analyze/play.js';
export { runPeriodicInflate } from './optimize/run/weave.js';
export { runPeriodicMultistart } from './optimize/run/multistart.js';
export { weaveEntries } from './model/weaves.js';
