// Worker thread for the two-core throughput figure: runs the kernel over its share of the pairs.
import { parentPort, workerData } from 'node:worker_threads';
import { circleContacts, CONTACT_STRIDE, MAX_CONTACTS } from '../src/kernel/index.js';
import { makePairs, PAIR_STRIDE } from './kernelWorkload.js';

const { count, seed, rounds } = workerData as { count: number; seed: number; rounds: number };
const pairs = makePairs(count, seed);
const views = splitViews(pairs, count);
const out = new Float64Array(MAX_CONTACTS * CONTACT_STRIDE);
// Warm-up (several sweeps, so the JIT reaches its optimised code as in the single-thread figure), then report
// when the timed rounds are done.
for (let k = 0; k < 3; k++) sweep();
parentPort!.postMessage({ ready: true });
parentPort!.once('message', () => {
  let contacts = 0;
  for (let k = 0; k < rounds; k++) contacts += sweep();
  parentPort!.postMessage({ done: true, contacts });
});

function sweep(): number {
  let n = 0;
  for (let i = 0; i < count; i++) {
    const v = views[i]!;
    n += circleContacts(v[0]!, v[1]!, pairs[i * PAIR_STRIDE + 6]!, v[2]!, v[3]!, pairs[i * PAIR_STRIDE + 13]!, out);
  }
  return n;
}

function splitViews(p: Float64Array, n: number): Float64Array[][] {
  const v: Float64Array[][] = [];
  for (let i = 0; i < n; i++) {
    const o = i * PAIR_STRIDE;
    v.push([p.subarray(o, o + 3), p.subarray(o + 3, o + 6), p.subarray(o + 7, o + 10), p.subarray(o + 10, o + 13)]);
  }
  return v;
}
