// Shared figures for the benchmarks: the `--repeats N` / `--json` flags and the median of repeats.

/** The upper median (middle element of the sorted copy): robust to one slow outlier in few repeats. */
export function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)]!;
}

/** `--repeats N` (at least 1; `fallback` when absent) and `--json` from the command line. */
export function benchArgs(args: string[], fallback: number): { repeats: number; json: boolean } {
  const at = args.indexOf('--repeats');
  return { repeats: at >= 0 ? Math.max(1, Number(args[at + 1])) : fallback, json: args.includes('--json') };
}
