// Browser stand-in for Node's crypto: nlopt-js reaches randomBytes only when it runs under Node (in the
// browser it draws from crypto.getRandomValues itself); the same source serves both here.
export function randomBytes(n: number): Uint8Array {
  return globalThis.crypto.getRandomValues(new Uint8Array(n));
}
export default { randomBytes };
