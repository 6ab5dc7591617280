// Public library API: re-exports only.
export * from './model/types.js';
export * from './model/result.js';
export { InputError } from './model/errors.js';
export { ringDistance, type RingDistance, type Contact } from './kernel/index.js';
