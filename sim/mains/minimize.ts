/**
 * One-dimensional minimisation without derivatives: golden-section search with parabolic
 * interpolation (R. P. Brent, "Algorithms for Minimization without Derivatives", Prentice-Hall 1973,
 * ch. 5, procedure localmin). The engine's roots.ts has Brent's root finder only; this is its
 * minimising companion, used for the worst switch-on angle and for extrema on odex's dense output.
 *
 * For a unimodal f on [a, b] it converges to the minimum within 2·tol (plus rounding); for any f it
 * returns a local minimum. The ends are evaluated too, and the best of all returned, so that a
 * minimum at an end of the interval is not missed.
 */

const GOLDEN = 0.5 * (3 - Math.sqrt(5));
const EPS = Math.sqrt(2.220446049250313e-16);

export interface MinimumResult {
  x: number;
  value: number;
  evaluations: number;
}

export function minimize(f: (x: number) => number, a: number, b: number, tol: number, maxIterations = 100): MinimumResult {
  let lo = Math.min(a, b);
  let hi = Math.max(a, b);
  let evaluations = 0;
  const F = (x: number) => {
    evaluations++;
    return f(x);
  };
  if (hi === lo) return { x: lo, value: F(lo), evaluations };
  let x = lo + GOLDEN * (hi - lo);
  let w = x;
  let v = x;
  let fx = F(x);
  let fw = fx;
  let fv = fx;
  let d = 0;
  let e = 0;
  for (let iteration = 0; iteration < maxIterations; iteration++) {
    const m = 0.5 * (lo + hi);
    const tol1 = EPS * Math.abs(x) + tol / 3;
    const tol2 = 2 * tol1;
    if (Math.abs(x - m) <= tol2 - 0.5 * (hi - lo)) break;
    let useGolden = true;
    if (Math.abs(e) > tol1) {
      let r = (x - w) * (fx - fv);
      let q = (x - v) * (fx - fw);
      let p = (x - v) * q - (x - w) * r;
      q = 2 * (q - r);
      if (q > 0) p = -p;
      else q = -q;
      r = e;
      e = d;
      if (Math.abs(p) < Math.abs(0.5 * q * r) && p > q * (lo - x) && p < q * (hi - x)) {
        d = p / q;
        const u = x + d;
        if (u - lo < tol2 || hi - u < tol2) d = x < m ? tol1 : -tol1;
        useGolden = false;
      }
    }
    if (useGolden) {
      e = (x < m ? hi : lo) - x;
      d = GOLDEN * e;
    }
    const u = x + (Math.abs(d) >= tol1 ? d : d > 0 ? tol1 : -tol1);
    const fu = F(u);
    if (fu <= fx) {
      if (u < x) hi = x;
      else lo = x;
      v = w;
      fv = fw;
      w = x;
      fw = fx;
      x = u;
      fx = fu;
    } else {
      if (u < x) lo = u;
      else hi = u;
      if (fu <= fw || w === x) {
        v = w;
        fv = fw;
        w = u;
        fw = fu;
      } else if (fu <= fv || v === x || v === w) {
        v = u;
        fv = fu;
      }
    }
  }
  let best = { x, value: fx };
  for (const end of [Math.min(a, b), Math.max(a, b)]) {
    const value = F(end);
    if (value < best.value) best = { x: end, value };
  }
  return { ...best, evaluations };
}
