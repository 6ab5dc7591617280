// Small linear programs for the mobility analysis, solved by HiGHS (WebAssembly) from CPLEX LP text.
// The solver is loaded once per module copy; each solve is a fresh native instance (no shared state).

export interface LpRow {
  /** Sparse terms: [variable name, coefficient]. */
  terms: [string, number][];
  sense: '>=' | '<=' | '=';
  rhs: number;
}

export interface LpProblem {
  sense: 'maximize' | 'minimize';
  objective: [string, number][];
  rows: LpRow[];
  /** Every variable must be listed here: [name, lower, upper] (±Infinity for none). */
  bounds: [string, number, number][];
}

export interface LpSolution {
  status: 'optimal' | 'infeasible' | 'unbounded' | 'failed';
  objective: number;
  values: Map<string, number>;
  /** HiGHS status text, kept for messages. */
  detail: string;
}

/** Coefficients smaller than this are left out of the LP text (HiGHS drops them anyway below 1e-9). */
const DROP_COEF = 1e-13;

interface HighsLike {
  solve(problem: string, options?: Record<string, unknown>): {
    Status: string;
    ObjectiveValue: number;
    Columns: Record<string, { Primal: number }>;
  };
}

let solverPromise: Promise<HighsLike> | null = null;

export function loadLpSolver(): Promise<HighsLike> {
  if (solverPromise === null) {
    solverPromise = import('highs').then((m) => {
      const loader = (m as unknown as { default: () => Promise<HighsLike> }).default;
      return loader();
    });
  }
  return solverPromise;
}

export async function solveLp(problem: LpProblem): Promise<LpSolution> {
  const highs = await loadLpSolver();
  const text = writeLp(problem);
  let raw: ReturnType<HighsLike['solve']>;
  try {
    raw = highs.solve(text, { output_flag: false });
  } catch (e) {
    const msg = e instanceof Error ? e.message : String(e);
    return { status: 'failed', objective: NaN, values: new Map(), detail: msg };
  }
  const values = new Map<string, number>();
  for (const [name, col] of Object.entries(raw.Columns ?? {})) values.set(name, col.Primal);
  for (const [name] of problem.bounds) if (!values.has(name)) values.set(name, 0);
  const status =
    raw.Status === 'Optimal' ? 'optimal'
      : raw.Status === 'Infeasible' ? 'infeasible'
        : raw.Status === 'Unbounded' || raw.Status === 'Primal infeasible or unbounded' ? 'unbounded'
          : 'failed';
  return { status, objective: raw.ObjectiveValue, values, detail: raw.Status };
}

/** CPLEX LP text. Every variable also appears in the objective (with 0) so HiGHS keeps its column. */
export function writeLp(p: LpProblem): string {
  const lines: string[] = [p.sense === 'maximize' ? 'Maximize' : 'Minimize'];
  const objTerms = new Map<string, number>(p.objective);
  for (const [name] of p.bounds) if (!objTerms.has(name)) objTerms.set(name, 0);
  lines.push(' obj: ' + linear([...objTerms.entries()], true));
  lines.push('Subject To');
  p.rows.forEach((row, i) => {
    const body = linear(row.terms, false);
    if (body === '') return;
    lines.push(` r${i}: ${body} ${row.sense} ${num(row.rhs)}`);
  });
  lines.push('Bounds');
  for (const [name, lo, hi] of p.bounds) {
    if (lo === -Infinity && hi === Infinity) lines.push(` ${name} free`);
    else if (lo === -Infinity) lines.push(` -inf <= ${name} <= ${num(hi)}`);
    else if (hi === Infinity) lines.push(` ${name} >= ${num(lo)}`);
    else lines.push(` ${num(lo)} <= ${name} <= ${num(hi)}`);
  }
  lines.push('End');
  return lines.join('\n');
}

function linear(terms: [string, number][], keepZeros: boolean): string {
  let out = '';
  for (const [name, c] of terms) {
    if (!keepZeros && !(Math.abs(c) > DROP_COEF)) continue;
    const v = keepZeros && !(Math.abs(c) > DROP_COEF) ? 0 : c;
    const sign = v < 0 ? '-' : '+';
    const mag = num(Math.abs(v));
    out += out === '' ? `${v < 0 ? '- ' : ''}${mag} ${name}` : ` ${sign} ${mag} ${name}`;
  }
  return out;
}

function num(v: number): string {
  return Number.isInteger(v) ? String(v) : v.toPrecision(17);
}
