/**
 * The one place that loads odex (E. Hairer & G. Wanner's ODEX, a Gragg–Bulirsch–Stoer
 * extrapolation integrator; Hairer, Nørsett & Wanner, Solving Ordinary Differential Equations I,
 * 2nd ed., §II.9). The package ships TypeScript source without declarations, which strict tsc
 * cannot compile, and a CommonJS build (src/odex.js) that Node, Jest and Metro load as they are;
 * so it is required here and typed by hand.
 */

export type Derivative = (x: number, y: number[]) => number[];

/** Called after each accepted step on [xOld, x]; `dense(component, t)` is valid only during the call. */
export type StepObserver = (
  step: number,
  xOld: number,
  x: number,
  y: number[],
  dense?: (component: number, t: number) => number,
) => boolean | void;

export enum OdexOutcome {
  Converged = 0,
  MaxStepsExceeded = 1,
  EarlyReturn = 2,
}

export interface OdexResult {
  y: number[];
  outcome: OdexOutcome;
  nStep: number;
  xEnd: number;
  nAccept: number;
  nReject: number;
  nEval: number;
}

export interface OdexSolver {
  n: number;
  maxSteps: number;
  initialStepSize: number;
  maxStepSize: number;
  denseOutput: boolean;
  denseComponents?: number[];
  relativeTolerance: number | number[];
  absoluteTolerance: number | number[];
  solve(f: Derivative, x: number, y0: number[], xEnd: number, observer?: StepObserver): OdexResult;
}

interface OdexModule {
  Solver: new (n: number) => OdexSolver;
}

// eslint-disable-next-line @typescript-eslint/no-require-imports
const odex = require('odex') as OdexModule;

export function createSolver(dimension: number): OdexSolver {
  return new odex.Solver(dimension);
}
