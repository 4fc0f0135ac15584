import * as mathjs from 'mathjs';
import * as fc from 'fast-check';

import { balance, expm, expmMinusIdentity, matMul } from '@/sim/solvers/expm';
import { gaussLegendre } from '@/sim/solvers/quadrature';
import { brent, cubicRoots, smallEigenvalues } from '@/sim/solvers/roots';

import { expectClose } from '../helpers/expectClose';

function reference(a: number[], n: number, h: number): number[] {
  const rows = Array.from({ length: n }, (_, r) => a.slice(r * n, r * n + n).map((x) => x * h));
  return (mathjs.expm(mathjs.matrix(rows)).toArray() as number[][]).flat();
}

function relativeError(actual: ArrayLike<number>, expected: number[]): number {
  let error = 0;
  let norm = 0;
  for (let k = 0; k < expected.length; k++) {
    error = Math.max(error, Math.abs(actual[k] - expected[k]));
    norm = Math.max(norm, Math.abs(expected[k]));
  }
  return error / norm;
}

describe('matrix exponential (Higham 2005 scaling and squaring with Padé)', () => {
  // mathjs's expm is the independent reference (its own Padé implementation).
  it('matches mathjs expm on random 5 × 5 matrices across norms', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -3, max: 3, noNaN: true }), { minLength: 25, maxLength: 25 }),
        fc.constantFrom(1e-4, 0.01, 0.3, 1, 4, 12),
        (entries, h) => {
          const mine = expm(new Float64Array(entries), 5, h);
          expect(relativeError(mine, reference(entries, 5, h))).toBeLessThan(1e-11);
        },
      ),
      { seed: 20240501, numRuns: 60 },
    );
  });

  it('matches mathjs on a badly scaled circuit matrix (units, not physics)', () => {
    // Series RLC, 25 nH / 300 pF, augmented with the source column: entries from 1 to 4e10.
    const L = 25e-9;
    const C = 300e-12;
    const a = [-1 / L, -1 / L, 600 / L, 1 / C, 0, 0, 0, 0, 0];
    const h = 2e-9;
    expect(relativeError(expm(new Float64Array(a), 3, h), reference(a, 3, h))).toBeLessThan(1e-12);
  });

  it('e^(Ah) − I keeps its digits for tiny h (Taylor: Ah + (Ah)²/2)', () => {
    const a = new Float64Array([-2, 1, 0.5, -3]);
    const h = 1e-9;
    const e = expmMinusIdentity(a, 2, h);
    const a2 = matMul(a, a, 2);
    for (let k = 0; k < 4; k++) expectClose(e[k], a[k] * h + (a2[k] * h * h) / 2, 1e-12);
  });

  it('balancing is an exact similarity by powers of two', () => {
    const a = new Float64Array([-1e7, -1e7, 1e3, 0]);
    const { B, d } = balance(a, 2);
    for (const x of d) expect(Math.log2(x) % 1).toBe(0);
    for (let r = 0; r < 2; r++) for (let c = 0; c < 2; c++) expect(B[r * 2 + c]).toBe((a[r * 2 + c] * d[c]) / d[r]);
  });
});

describe('root finding and small eigenvalues', () => {
  it('brent finds cos(x) = x to rounding (Brent 1973, ch. 4)', () => {
    expectClose(
      brent((x) => Math.cos(x) - x, 0, 1),
      0.7390851332151607,
      4e-16,
    );
  });

  it('cubicRoots recovers known roots, real and complex', () => {
    // (x − 2)(x² + 2x + 5): roots 2 and −1 ± 2j.
    const roots = cubicRoots(0, 1, -10).sort((p, q) => p.im - q.im);
    expectClose(roots[0].re, -1, 1e-12);
    expectClose(roots[0].im, -2, 1e-12);
    expectClose(roots[1].re, 2, 1e-12);
    expectClose(roots[2].im, 2, 1e-12);
  });

  it('the lossless series LC has eigenvalues ±jωn (R = 0)', () => {
    // State matrix of i, vC: [[−R/L, −1/L], [1/C, 0]]; R = 0 gives λ = ±j/√(LC) [der].
    const L = 10e-6;
    const C = 100e-6;
    const roots = smallEigenvalues([0, -1 / L, 1 / C, 0], 2);
    for (const r of roots) {
      expectClose(r.re, 0, 0, 1e-9);
      expectClose(Math.abs(r.im), 1 / Math.sqrt(L * C), 1e-14);
    }
  });
});

describe('Gauss–Legendre rule', () => {
  it('is exact to degree 15 with 8 nodes', () => {
    const { fractions, weights } = gaussLegendre(8);
    for (let degree = 0; degree <= 15; degree++) {
      const sum = fractions.reduce((s, x, k) => s + weights[k] * x ** degree, 0);
      expectClose(sum, 1 / (degree + 1), 1e-14);
    }
  });
});
