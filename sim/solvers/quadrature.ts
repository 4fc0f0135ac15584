/**
 * Gauss–Legendre quadrature nodes and weights, computed once by Newton's method on the Legendre
 * polynomial (three-term recurrence) — see e.g. Press et al., Numerical Recipes, 3rd ed., §4.6.
 * An n-point rule is exact for polynomials of degree 2n − 1.
 */

export interface GaussRule {
  /** Nodes as fractions of the interval, in (0, 1). */
  fractions: number[];
  /** Weights for an interval of length 1 (they sum to 1). */
  weights: number[];
}

export function gaussLegendre(n: number): GaussRule {
  const fractions: number[] = [];
  const weights: number[] = [];
  for (let k = 1; k <= n; k++) {
    let x = Math.cos((Math.PI * (k - 0.25)) / (n + 0.5));
    let derivative = 0;
    for (let iteration = 0; iteration < 100; iteration++) {
      let p0 = 1;
      let p1 = x;
      for (let j = 2; j <= n; j++) {
        const p2 = ((2 * j - 1) * x * p1 - (j - 1) * p0) / j;
        p0 = p1;
        p1 = p2;
      }
      derivative = (n * (x * p1 - p0)) / (x * x - 1);
      const step = p1 / derivative;
      x -= step;
      if (Math.abs(step) < 1e-16) break;
    }
    fractions.push((1 - x) / 2);
    weights.push(1 / ((1 - x * x) * derivative * derivative));
  }
  return { fractions, weights };
}

/** The rule the engine integrates i² with: exact to degree 15 on each sub-interval. */
export const GAUSS8 = gaussLegendre(8);
