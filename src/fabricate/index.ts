// Fabrication: units, meshes, mesh checks, contact tracks, cautions (re-exports only).
export * from './cautions.js';
export * from './presets.js';
export * from './gauge.js';
export * from './plan.js';
export * from './torusMesh.js';
export * from './meshCheck.js';
export * from './stl.js';
export * from './obj.js';
export * from './threeMf.js';
export * from './fabricate.js';
export * from './motion.js';
export * from './tracks.js';
