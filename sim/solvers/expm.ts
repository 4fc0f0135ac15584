/**
 * Small dense matrices in plain Float64Arrays (row-major n × n) and the matrix exponential.
 *
 * expm: scaling and squaring with Padé approximants of degree 3, 5, 7, 9 or 13 chosen from the
 * 1-norm — N. J. Higham, "The scaling and squaring method for the matrix exponential revisited",
 * SIAM J. Matrix Anal. Appl. 26(4), 2005, Algorithm 2.3 (θ_m from its Table 2.3). The Padé
 * coefficients are computed from the closed formula c_k = (2m−k)!·m! / ((2m)!·k!·(m−k)!).
 * mathjs's expm is the reference in the tests; this one exists because it is ~100× faster per call.
 */

export type Matrix = Float64Array;

export function identity(n: number): Matrix {
  const m = new Float64Array(n * n);
  for (let k = 0; k < n; k++) m[k * n + k] = 1;
  return m;
}

/** out = a·b (out may not alias a or b). */
export function matMul(a: Matrix, b: Matrix, n: number, out: Matrix = new Float64Array(n * n)): Matrix {
  for (let r = 0; r < n; r++) {
    for (let c = 0; c < n; c++) {
      let sum = 0;
      for (let k = 0; k < n; k++) sum += a[r * n + k] * b[k * n + c];
      out[r * n + c] = sum;
    }
  }
  return out;
}

/** out = a·x. */
export function matVec(a: Matrix, x: ArrayLike<number>, n: number, out: Float64Array = new Float64Array(n)): Float64Array {
  for (let r = 0; r < n; r++) {
    let sum = 0;
    for (let k = 0; k < n; k++) sum += a[r * n + k] * x[k];
    out[r] = sum;
  }
  return out;
}

export function dot(a: ArrayLike<number>, b: ArrayLike<number>, n: number): number {
  let sum = 0;
  for (let k = 0; k < n; k++) sum += a[k] * b[k];
  return sum;
}

/** out = row·a (a row vector times a matrix). */
export function rowTimes(row: ArrayLike<number>, a: Matrix, n: number, out: Float64Array = new Float64Array(n)): Float64Array {
  for (let c = 0; c < n; c++) {
    let sum = 0;
    for (let k = 0; k < n; k++) sum += row[k] * a[k * n + c];
    out[c] = sum;
  }
  return out;
}

export function norm1(a: Matrix, n: number): number {
  let best = 0;
  for (let c = 0; c < n; c++) {
    let sum = 0;
    for (let r = 0; r < n; r++) sum += Math.abs(a[r * n + c]);
    if (sum > best) best = sum;
  }
  return best;
}

/** Solves a·x = b for n right-hand sides (b is n × n, overwritten with x) by LU with partial pivoting. */
function solveInPlace(a: Matrix, b: Matrix, n: number): void {
  for (let col = 0; col < n; col++) {
    let pivot = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(a[r * n + col]) > Math.abs(a[pivot * n + col])) pivot = r;
    if (pivot !== col) {
      for (let k = 0; k < n; k++) {
        const ta = a[col * n + k];
        a[col * n + k] = a[pivot * n + k];
        a[pivot * n + k] = ta;
        const tb = b[col * n + k];
        b[col * n + k] = b[pivot * n + k];
        b[pivot * n + k] = tb;
      }
    }
    const diag = a[col * n + col];
    for (let r = col + 1; r < n; r++) {
      const factor = a[r * n + col] / diag;
      if (factor === 0) continue;
      for (let k = col; k < n; k++) a[r * n + k] -= factor * a[col * n + k];
      for (let k = 0; k < n; k++) b[r * n + k] -= factor * b[col * n + k];
    }
  }
  for (let r = n - 1; r >= 0; r--) {
    const diag = a[r * n + r];
    for (let k = 0; k < n; k++) {
      let sum = b[r * n + k];
      for (let j = r + 1; j < n; j++) sum -= a[r * n + j] * b[j * n + k];
      b[r * n + k] = sum / diag;
    }
  }
}

function padeCoefficients(m: number): number[] {
  const factorial = (k: number) => {
    let f = 1;
    for (let j = 2; j <= k; j++) f *= j;
    return f;
  };
  const out: number[] = [];
  for (let k = 0; k <= m; k++) {
    out.push((factorial(2 * m - k) * factorial(m)) / (factorial(2 * m) * factorial(k) * factorial(m - k)));
  }
  return out;
}

const PADE: Record<number, number[]> = {
  3: padeCoefficients(3),
  5: padeCoefficients(5),
  7: padeCoefficients(7),
  9: padeCoefficients(9),
  13: padeCoefficients(13),
};
const THETA: [number, number][] = [
  [3, 1.495585217958292e-2],
  [5, 2.53939833006323e-1],
  [7, 9.504178996162932e-1],
  [9, 2.097847961257068],
];
const THETA13 = 5.371920351148152;

/** Counts expm calls, for the solver counters. */
export const expmCounter = { calls: 0 };

/**
 * e^(A·h) − I, accurate relative to its own size even when h is tiny (the expm1 of matrices):
 * from the Padé form R = (V − U)⁻¹(V + U), R − I = 2·(V − U)⁻¹·U, and the squarings done as
 * E(2x) = E(x)·(E(x) + 2I) so that the small deviations from I are never rounded away.
 * Stepping z ← z + E·z with it keeps a slow mode exact on a fine grid of a stiff circuit.
 */
export function expmMinusIdentity(A: Matrix, n: number, h = 1): Matrix {
  expmCounter.calls++;
  const size = n * n;
  const w = workspace(n);
  const { a, a2, a4, a6, u, v, inner, t, q } = w;
  for (let k = 0; k < size; k++) a[k] = A[k] * h;
  const norm = norm1(a, n);
  let m = 13;
  for (const [degree, theta] of THETA) {
    if (norm <= theta) {
      m = degree;
      break;
    }
  }
  let squarings = 0;
  if (m === 13 && norm > THETA13) {
    squarings = Math.max(0, Math.ceil(Math.log2(norm / THETA13)));
    const scale = 2 ** -squarings;
    for (let k = 0; k < size; k++) a[k] *= scale;
  }
  const b = PADE[m];
  matMul(a, a, n, a2);
  if (m === 13) {
    matMul(a2, a2, n, a4);
    matMul(a4, a2, n, a6);
    for (let k = 0; k < size; k++) inner[k] = b[13] * a6[k] + b[11] * a4[k] + b[9] * a2[k];
    matMul(a6, inner, n, t);
    for (let k = 0; k < size; k++) t[k] += b[7] * a6[k] + b[5] * a4[k] + b[3] * a2[k];
    for (let k = 0; k < n; k++) t[k * n + k] += b[1];
    matMul(a, t, n, u);
    for (let k = 0; k < size; k++) inner[k] = b[12] * a6[k] + b[10] * a4[k] + b[8] * a2[k];
    matMul(a6, inner, n, v);
    for (let k = 0; k < size; k++) v[k] += b[6] * a6[k] + b[4] * a4[k] + b[2] * a2[k];
    for (let k = 0; k < n; k++) v[k * n + k] += b[0];
  } else {
    // Powers A², A⁴, … up to A^(m−1); U = A·Σ b_odd A^(k−1), V = Σ b_even A^k.
    const odd = inner;
    odd.fill(0);
    v.fill(0);
    for (let k = 0; k < n; k++) {
      odd[k * n + k] = b[1];
      v[k * n + k] = b[0];
    }
    let power = a2;
    for (let k = 2; k <= m; k += 2) {
      if (k > 2) {
        const next = power === a2 ? a4 : power === a4 ? a6 : t === power ? a4 : t;
        matMul(power, a2, n, next);
        power = next;
      }
      for (let j = 0; j < size; j++) {
        v[j] += b[k] * power[j];
        odd[j] += b[k + 1] * power[j];
      }
    }
    matMul(a, odd, n, u);
  }
  const e = new Float64Array(size);
  for (let k = 0; k < size; k++) {
    q[k] = v[k] - u[k];
    e[k] = 2 * u[k];
  }
  solveInPlace(q, e, n);
  let result: Matrix = e;
  for (let s = 0; s < squarings; s++) result = doubleMinusIdentity(result, n);
  return result;
}

interface Workspace {
  a: Matrix;
  a2: Matrix;
  a4: Matrix;
  a6: Matrix;
  u: Matrix;
  v: Matrix;
  inner: Matrix;
  t: Matrix;
  q: Matrix;
}

const workspaces = new Map<number, Workspace>();

/** Scratch matrices per size, reused across calls (expm is called in tight loops). */
function workspace(n: number): Workspace {
  let w = workspaces.get(n);
  if (!w) {
    const make = () => new Float64Array(n * n);
    w = { a: make(), a2: make(), a4: make(), a6: make(), u: make(), v: make(), inner: make(), t: make(), q: make() };
    workspaces.set(n, w);
  }
  return w;
}

/** E(2x) = E(x)·(E(x) + 2I), for E(x) = e^(Ax) − I. */
export function doubleMinusIdentity(e: Matrix, n: number): Matrix {
  const out = matMul(e, e, n);
  for (let k = 0; k < n * n; k++) out[k] += 2 * e[k];
  return out;
}

/** e^(A·h) for an n × n matrix A (h defaults to 1). */
export function expm(A: Matrix, n: number, h = 1): Matrix {
  const e = expmMinusIdentity(A, n, h);
  for (let k = 0; k < n; k++) e[k * n + k] += 1;
  return e;
}

/** out = x + e·x: one step with an e^(Ah) − I matrix. */
export function stepWith(e: Matrix, x: ArrayLike<number>, n: number, out: Float64Array = new Float64Array(n)): Float64Array {
  for (let r = 0; r < n; r++) {
    let sum = 0;
    for (let k = 0; k < n; k++) sum += e[r * n + k] * x[k];
    out[r] = x[r] + sum;
  }
  return out;
}

/**
 * Diagonal balancing by powers of two (Parlett & Reinsch, Numer. Math. 13, 1969): returns
 * B = D⁻¹·A·D and d = diag(D), with row and column norms made comparable so that expm's norm-based
 * scaling sees the physics (ωn) and not the units (1/L in A per V·s). Exact: powers of two only.
 */
export function balance(A: Matrix, n: number): { B: Matrix; d: Float64Array } {
  const B = new Float64Array(A);
  const d = new Float64Array(n).fill(1);
  let done = false;
  for (let sweep = 0; sweep < 100 && !done; sweep++) {
    done = true;
    for (let k = 0; k < n; k++) {
      let c = 0;
      let r = 0;
      for (let j = 0; j < n; j++) {
        if (j === k) continue;
        c += Math.abs(B[j * n + k]);
        r += Math.abs(B[k * n + j]);
      }
      if (c === 0 || r === 0) continue;
      const s = c + r;
      let f = 1;
      let g = r / 2;
      while (c < g) {
        f *= 2;
        c *= 4;
      }
      g = r * 2;
      while (c > g) {
        f /= 2;
        c /= 4;
      }
      if ((c + r) / f < 0.95 * s) {
        done = false;
        d[k] *= f;
        for (let j = 0; j < n; j++) B[k * n + j] /= f;
        for (let j = 0; j < n; j++) B[j * n + k] *= f;
      }
    }
  }
  return { B, d };
}
