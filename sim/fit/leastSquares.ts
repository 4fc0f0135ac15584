/**
 * Levenberg–Marquardt on a small number of parameters with a finite-difference Jacobian.
 *
 * Method: K. Levenberg (1944), D. W. Marquardt, "An algorithm for least-squares estimation of
 * nonlinear parameters", J. SIAM 11(2), 1963 — the damped normal equations
 * (JᵀJ + λ·diag(JᵀJ))·Δ = −Jᵀr, λ lowered after a step that reduces the cost and raised after one
 * that does not. Forward differences; the residual function may return null for a parameter vector
 * it cannot evaluate (treated as an infinite cost, so the step is refused).
 */
export interface LeastSquaresOptions {
  maxIterations: number;
  /** Stop when an accepted step lowers the cost by less than this fraction. */
  costTolerance: number;
  /** Stop when every component of an accepted step is smaller than this. */
  stepTolerance: number;
  /** Largest change of any parameter in one step. */
  maxStep: number;
  /** Finite-difference step. */
  differenceStep: number;
}

export interface LeastSquaresResult {
  x: number[];
  /** ½·Σr² at x. */
  cost: number;
  initialCost: number;
  iterations: number;
  evaluations: number;
  converged: boolean;
  reason: 'cost-tolerance' | 'step-tolerance' | 'max-iterations' | 'stalled';
}

/** Solves A·x = b (small, dense) by Gaussian elimination with partial pivoting; null if singular. */
export function solveLinear(a: number[][], b: number[]): number[] | null {
  const n = b.length;
  const m = a.map((row, k) => [...row, b[k]]);
  for (let col = 0; col < n; col++) {
    let pivot = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(m[r][col]) > Math.abs(m[pivot][col])) pivot = r;
    if (!(Math.abs(m[pivot][col]) > 0)) return null;
    [m[col], m[pivot]] = [m[pivot], m[col]];
    for (let r = col + 1; r < n; r++) {
      const f = m[r][col] / m[col][col];
      for (let c = col; c <= n; c++) m[r][c] -= f * m[col][c];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let r = n - 1; r >= 0; r--) {
    let s = m[r][n];
    for (let c = r + 1; c < n; c++) s -= m[r][c] * x[c];
    x[r] = s / m[r][r];
  }
  return x;
}

function costOf(r: Float64Array | null): number {
  if (!r) return Infinity;
  let s = 0;
  for (const v of r) s += v * v;
  return Number.isFinite(s) ? s / 2 : Infinity;
}

export function levenbergMarquardt(
  residuals: (x: number[]) => Float64Array | null,
  x0: number[],
  options: LeastSquaresOptions,
): LeastSquaresResult {
  const n = x0.length;
  let x = [...x0];
  let r = residuals(x);
  let evaluations = 1;
  let cost = costOf(r);
  const initialCost = cost;
  if (!r || !Number.isFinite(cost)) {
    return { x, cost, initialCost, iterations: 0, evaluations, converged: false, reason: 'stalled' };
  }
  let lambda = 1e-3;
  let iterations = 0;
  while (iterations < options.maxIterations) {
    iterations++;
    const current = r as Float64Array;
    const m = current.length;
    // Jacobian by forward differences, one column per parameter.
    const jacobian: Float64Array[] = [];
    for (let j = 0; j < n; j++) {
      const xj = [...x];
      xj[j] += options.differenceStep;
      const rj = residuals(xj);
      evaluations++;
      const column = new Float64Array(m);
      if (rj) for (let k = 0; k < m; k++) column[k] = (rj[k] - current[k]) / options.differenceStep;
      jacobian.push(column);
    }
    const jtj = Array.from({ length: n }, (_, p) =>
      Array.from({ length: n }, (_, q) => {
        let s = 0;
        for (let k = 0; k < m; k++) s += jacobian[p][k] * jacobian[q][k];
        return s;
      }),
    );
    const jtr = Array.from({ length: n }, (_, p) => {
      let s = 0;
      for (let k = 0; k < m; k++) s += jacobian[p][k] * current[k];
      return s;
    });
    let accepted = false;
    for (let attempt = 0; attempt < 12 && !accepted; attempt++) {
      const damped = jtj.map((row, p) => row.map((v, q) => (p === q ? v + lambda * (v || 1e-12) : v)));
      const step = solveLinear(
        damped,
        jtr.map((g) => -g),
      );
      if (!step) {
        lambda *= 10;
        continue;
      }
      const largest = Math.max(...step.map(Math.abs));
      const scale = largest > options.maxStep ? options.maxStep / largest : 1;
      const trial = x.map((v, p) => v + scale * step[p]);
      const rTrial = residuals(trial);
      evaluations++;
      const trialCost = costOf(rTrial);
      if (trialCost < cost) {
        const drop = (cost - trialCost) / cost;
        x = trial;
        r = rTrial;
        cost = trialCost;
        lambda = Math.max(lambda / 3, 1e-12);
        accepted = true;
        if (largest * scale < options.stepTolerance) {
          return { x, cost, initialCost, iterations, evaluations, converged: true, reason: 'step-tolerance' };
        }
        if (drop < options.costTolerance) {
          return { x, cost, initialCost, iterations, evaluations, converged: true, reason: 'cost-tolerance' };
        }
      } else {
        lambda *= 4;
      }
    }
    if (!accepted) {
      // No damped step lowers the cost. At a minimum (to within what the differences resolve) the
      // undamped Gauss–Newton step predicts almost no reduction; elsewhere the fit is stuck.
      const gaussNewton = solveLinear(
        jtj,
        jtr.map((g) => -g),
      );
      const predicted = gaussNewton ? -0.5 * gaussNewton.reduce((s, v, p) => s + v * jtr[p], 0) : Infinity;
      const converged = cost === 0 || predicted <= 100 * options.costTolerance * cost;
      return { x, cost, initialCost, iterations, evaluations, converged, reason: 'stalled' };
    }
  }
  return { x, cost, initialCost, iterations, evaluations, converged: false, reason: 'max-iterations' };
}
