// Types for the part of numeric (a general-purpose numerical library from the npm registry) the reference tests use.
declare module "numeric" {
  interface UncminResult {
    solution: number[];
    f: number;
    gradient: number[];
    iterations: number;
    message: string;
  }
  /** Unconstrained minimisation (quasi-Newton, BFGS); the gradient is taken numerically when not given. */
  export function uncmin(
    f: (x: number[]) => number,
    x0: number[],
    tol?: number,
    gradient?: (x: number[]) => number[],
    maxit?: number,
  ): UncminResult;
}
