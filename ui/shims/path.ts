// Browser stand-in for node:path: only basename is reached from the model code.
export function basename(p: string): string {
  return p.split(/[\\/]/).pop() ?? p;
}
export default { basename };
