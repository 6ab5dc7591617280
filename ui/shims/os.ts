// Browser stand-in for node:os: the worker count follows the browser's idea of the core count.
export function availableParallelism(): number {
  return Math.max(1, Math.min(4, globalThis.navigator?.hardwareConcurrency ?? 2));
}
export default { availableParallelism };
