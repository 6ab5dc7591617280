// Types for the parts of nlopt-js 0.1.1 used here (the package ships none). Constraint convention: fc(x) <= 0.
declare module 'nlopt-js' {
  export type ScalarFunction = (x: Float64Array, grad: Float64Array | null) => number;
  export interface OptimizeResult {
    success: boolean;
    x: number[];
    value: number;
  }
  export class Optimize {
    constructor(algorithm: number, n: number);
    setMinObjective(fn: ScalarFunction, tol: number): void;
    setMaxObjective(fn: ScalarFunction, tol: number): void;
    addInequalityConstraint(fn: ScalarFunction, tol: number): void;
    addEqualityConstraint(fn: ScalarFunction, tol: number): void;
    setLowerBounds(bounds: number[]): void;
    setUpperBounds(bounds: number[]): void;
    setMaxeval(n: number): void;
    setMaxtime(seconds: number): void;
    optimize(x0: number[]): OptimizeResult;
  }
  export const Algorithm: Record<string, number>;
  export const ready: Promise<void>;
  export const GC: { flush(): void };
  const nlopt: {
    Optimize: typeof Optimize;
    Algorithm: Record<string, number>;
    ready: Promise<void>;
    GC: { flush(): void };
  };
  export default nlopt;
}
