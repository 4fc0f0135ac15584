/**
 * Root finding and polynomial roots used by every solver.
 *
 * brent: R. P. Brent, "Algorithms for Minimization without Derivatives", Prentice-Hall 1973,
 * ch. 4 (the zeroin procedure): bisection safeguarding inverse quadratic interpolation.
 */

const EPS = 2.220446049250313e-16;

/**
 * A root of f in [a, b], given f(a) and f(b) of opposite signs (or one of them zero). Converges to
 * |Δx| ≤ 2·eps·|x| + xTol. Returns a if f(a) = 0, b if f(b) = 0.
 */
export function brent(
  f: (x: number) => number,
  a: number,
  b: number,
  fa = f(a),
  fb = f(b),
  xTol = 0,
  maxIterations = 200,
): number {
  if (fa === 0) return a;
  if (fb === 0) return b;
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let iteration = 0; iteration < maxIterations; iteration++) {
    if ((fb > 0 && fc > 0) || (fb < 0 && fc < 0)) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol = 2 * EPS * Math.abs(b) + 0.5 * xTol;
    const m = 0.5 * (c - b);
    if (Math.abs(m) <= tol || fb === 0) return b;
    if (Math.abs(e) >= tol && Math.abs(fa) > Math.abs(fb)) {
      let p: number;
      let q: number;
      const s = fb / fa;
      if (a === c) {
        p = 2 * m * s;
        q = 1 - s;
      } else {
        const qa = fa / fc;
        const r = fb / fc;
        p = s * (2 * m * qa * (qa - r) - (b - a) * (r - 1));
        q = (qa - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      if (2 * p < Math.min(3 * m * q - Math.abs(tol * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = m;
        e = m;
      }
    } else {
      d = m;
      e = m;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol ? d : m > 0 ? tol : -tol;
    fb = f(b);
  }
  return b;
}

export interface Complex {
  re: number;
  im: number;
}

/** Roots of x² + p·x + q, without cancellation. */
export function quadraticRoots(p: number, q: number): Complex[] {
  const disc = p * p - 4 * q;
  if (disc >= 0) {
    const root = Math.sqrt(disc);
    const big = -0.5 * (p + (p >= 0 ? root : -root));
    if (big === 0)
      return [
        { re: 0, im: 0 },
        { re: 0, im: 0 },
      ];
    return [
      { re: big, im: 0 },
      { re: q / big, im: 0 },
    ];
  }
  const im = 0.5 * Math.sqrt(-disc);
  return [
    { re: -0.5 * p, im },
    { re: -0.5 * p, im: -im },
  ];
}

/** Roots of x³ + a·x² + b·x + c: one real root by safeguarded Newton, then the quadratic left. */
export function cubicRoots(a: number, b: number, c: number): Complex[] {
  const p = (x: number) => ((x + a) * x + b) * x + c;
  const bound = 1 + Math.max(Math.abs(a), Math.abs(b), Math.abs(c));
  let lo = -bound;
  let hi = bound;
  let x = p(0) > 0 ? -Math.min(1, bound) : Math.min(1, bound);
  for (let k = 0; k < 200; k++) {
    const fx = p(x);
    if (fx === 0) break;
    if (fx > 0) hi = Math.min(hi, x);
    else lo = Math.max(lo, x);
    const slope = (3 * x + 2 * a) * x + b;
    let next = slope !== 0 ? x - fx / slope : 0.5 * (lo + hi);
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (Math.abs(next - x) <= 4 * EPS * Math.abs(x)) {
      x = next;
      break;
    }
    x = next;
  }
  // Deflate: x³ + a x² + b x + c = (x − r)(x² + (a + r) x + (b + r(a + r))).
  const p1 = a + x;
  const q1 = x !== 0 ? -c / x : b + x * p1;
  return [{ re: x, im: 0 }, ...quadraticRoots(p1, q1)];
}

/** Eigenvalues of a real matrix of size 1, 2 or 3 (row-major), through its characteristic polynomial. */
export function smallEigenvalues(a: ArrayLike<number>, n: number): Complex[] {
  if (n === 0) return [];
  if (n === 1) return [{ re: a[0], im: 0 }];
  if (n === 2) return quadraticRoots(-(a[0] + a[3]), a[0] * a[3] - a[1] * a[2]);
  const trace = a[0] + a[4] + a[8];
  const minors = a[0] * a[4] - a[1] * a[3] + a[0] * a[8] - a[2] * a[6] + a[4] * a[8] - a[5] * a[7];
  const det = a[0] * (a[4] * a[8] - a[5] * a[7]) - a[1] * (a[3] * a[8] - a[5] * a[6]) + a[2] * (a[3] * a[7] - a[4] * a[6]);
  return cubicRoots(-trace, minors, -det);
}
