/**
 * Closed form of the series RLC (and RC, when L = 0) with nonzero initial conditions, piecewise
 * across the bypass: the independent analytic path, and the fast metric evaluation that the spread
 * analysis calls thousands of times (closedFormMetrics).
 *
 * Applies when there is no damping branch, bleeder or load and the source is a step. ESR then sits
 * in series with the capacitor, so the loop is one series RLC with R = Rsrc + Rf (+ Rpre) + ESR,
 * and the bus voltage is v = vC + ESR·i.
 *
 * With x = vC − Vs, A = V0 − Vs (any standard circuit text, second-order step response with
 * initial conditions; REFERENCE §1 gives the three forms):
 *   x'' + 2αx' + ωn²x = 0,  x(0) = A,  x'(0) = I0/C,  i = C·x'.
 * Every quantity (x, i, di/dt, v − Vs) is a two-term function in one of these bases, chosen so that
 * no formula cancels catastrophically near critical damping or on stiff circuits:
 *   under      e^(−αs)·[p·cos ωs + q·sin(ωs)/ω]               (α < ωn; R = 0 is α = 0)
 *   critical   e^(−αs)·[p + q·s]                               (α = ωn exactly)
 *   nearOver   e^(−αs)·[p·cosh βs + q·sinh(βs)/β]              (α > ωn, β < α/2)
 *   over       p·e^(s1·s) + q·e^(s2·s),  s1 = −ωn²/(α+β), s2 = −(α+β)   (β ≥ α/2)
 *   first      p·e^(−s/RC)                                     (L = 0)
 * Extrema are the zeros of the derivative, found analytically (atan2, atanh, log), not sampled.
 */
import type { Design } from '../design';
import { assembleMetrics, settleTarget, type Metrics, type RawRun } from '../metrics';
import { steadyStateVoltage } from '../model/seriesPath';
import { Collector, type Group } from './collector';
import { brent } from './roots';
import { GAUSS8 } from './quadrature';

type Basis =
  | { kind: 'under'; alpha: number; omega: number; kappa: number }
  | { kind: 'critical'; alpha: number; kappa: number }
  | { kind: 'nearOver'; alpha: number; beta: number; kappa: number; s1: number }
  | { kind: 'over'; beta: number; s1: number; s2: number }
  | { kind: 'first'; rate: number };

type Coef = readonly [number, number];

function basisOf(r: number, l: number, c: number): Basis {
  if (l === 0) return { kind: 'first', rate: 1 / (r * c) };
  const alpha = r / (2 * l);
  const omegaN = 1 / Math.sqrt(l * c);
  // α² − ωn² as a product, so that near-critical circuits keep their digits.
  const disc = (alpha - omegaN) * (alpha + omegaN);
  if (disc < 0) {
    const omega = Math.sqrt(-disc);
    return { kind: 'under', alpha, omega, kappa: disc };
  }
  if (disc === 0) return { kind: 'critical', alpha, kappa: 0 };
  const beta = Math.sqrt(disc);
  const s1 = -(omegaN * omegaN) / (alpha + beta);
  if (beta < 0.5 * alpha) return { kind: 'nearOver', alpha, beta, kappa: disc, s1 };
  return { kind: 'over', beta, s1, s2: -(alpha + beta) };
}

function evaluate(b: Basis, c: Coef, s: number): number {
  switch (b.kind) {
    case 'under': {
      const e = Math.exp(-b.alpha * s);
      return e * (c[0] * Math.cos(b.omega * s) + (c[1] * Math.sin(b.omega * s)) / b.omega);
    }
    case 'critical':
      return Math.exp(-b.alpha * s) * (c[0] + c[1] * s);
    case 'nearOver': {
      // e^(−αs)cosh βs = ½e^(s1 s)(1 + e^(−2βs)); e^(−αs)sinh(βs)/β = e^(s1 s)(1 − e^(−2βs))/(2β).
      const e1 = Math.exp(b.s1 * s);
      const decay = Math.exp(-2 * b.beta * s);
      return c[0] * 0.5 * e1 * (1 + decay) + (c[1] * e1 * -Math.expm1(-2 * b.beta * s)) / (2 * b.beta);
    }
    case 'over':
      return c[0] * Math.exp(b.s1 * s) + c[1] * Math.exp(b.s2 * s);
    case 'first':
      return c[0] * Math.exp(-b.rate * s);
  }
}

/** Coefficients of the derivative, in the same basis. */
function derivative(b: Basis, c: Coef): Coef {
  switch (b.kind) {
    case 'under':
    case 'critical':
    case 'nearOver':
      // (e^(−αs)[p·Ck + q·Sk])' = e^(−αs)[(q − αp)·Ck + (κp − αq)·Sk], with Ck' = κ·Sk, Sk' = Ck.
      return [c[1] - b.alpha * c[0], b.kappa * c[0] - b.alpha * c[1]];
    case 'over':
      return [b.s1 * c[0], b.s2 * c[1]];
    case 'first':
      return [-b.rate * c[0], 0];
  }
}

/** Ascending zeros in (0, sMax] of a two-term function, at most `count` of them. */
function zeros(b: Basis, c: Coef, sMax: number, count = 3): number[] {
  const out: number[] = [];
  const push = (s: number) => {
    if (s > 0 && s <= sMax && Number.isFinite(s)) out.push(s);
  };
  switch (b.kind) {
    case 'under': {
      // p cos θ + (q/ω) sin θ = R cos(θ − φ): zeros at θ = φ + π/2 + kπ.
      if (c[0] === 0 && c[1] === 0) return out;
      const phi = Math.atan2(c[1] / b.omega, c[0]);
      let theta = phi + Math.PI / 2;
      theta -= Math.PI * Math.floor(theta / Math.PI);
      if (theta === 0) theta = Math.PI;
      for (let k = 0; k < count; k++) push((theta + k * Math.PI) / b.omega);
      return out;
    }
    case 'critical':
      if (c[1] !== 0) push(-c[0] / c[1]);
      return out;
    case 'nearOver': {
      // tanh(βs) = −p·β/q.
      if (c[1] === 0) return out;
      const y = (-c[0] * b.beta) / c[1];
      if (y > 0 && y < 1) push(Math.atanh(y) / b.beta);
      return out;
    }
    case 'over': {
      // e^((s1 − s2)s) = −q/p.
      if (c[0] === 0) return out;
      const ratio = -c[1] / c[0];
      if (ratio > 1) push(Math.log(ratio) / (2 * b.beta));
      return out;
    }
    case 'first':
      return out;
  }
}

/** The response of one series phase from its initial state. */
class SeriesResponse {
  readonly basis: Basis;
  readonly x: Coef;
  readonly i: Coef;
  readonly di: Coef;
  readonly xv: Coef;

  constructor(
    readonly r: number,
    readonly l: number,
    readonly c: number,
    readonly vs: number,
    readonly esr: number,
    readonly i0: number,
    readonly v0: number,
  ) {
    this.basis = basisOf(r, l, c);
    const a = v0 - vs;
    const b = this.basis;
    if (b.kind === 'over') {
      const slope = i0 / c;
      this.x = [(slope - b.s2 * a) / (b.s1 - b.s2), (b.s1 * a - slope) / (b.s1 - b.s2)];
    } else if (b.kind === 'first') {
      this.x = [a, 0];
    } else {
      this.x = [a, i0 / c + b.alpha * a];
    }
    const dx = derivative(b, this.x);
    this.i = [c * dx[0], c * dx[1]];
    this.di = derivative(b, this.i);
    this.xv = [this.x[0] + esr * this.i[0], this.x[1] + esr * this.i[1]];
  }

  // At s = 0 the state is the given one exactly (the sum of the basis terms would round it).
  vC(s: number): number {
    return s === 0 ? this.v0 : this.vs + evaluate(this.basis, this.x, s);
  }

  current(s: number): number {
    if (s === 0) return this.basis.kind === 'first' ? (this.vs - this.v0) / this.r : this.i0;
    return evaluate(this.basis, this.i, s);
  }

  bus(s: number): number {
    return s === 0 ? this.v0 + this.esr * this.current(0) : this.vs + evaluate(this.basis, this.xv, s);
  }

  /** ∫₀^S i² ds. */
  i2(sEnd: number): number {
    if (sEnd <= 0) return 0;
    const x0 = this.v0 - this.vs;
    const x1 = this.vC(sEnd) - this.vs;
    const i1 = this.current(sEnd);
    const i0 = this.basis.kind === 'first' ? this.current(0) : this.i0;
    if (this.r > 0) {
      // Energy balance about the equilibrium: R∫i² = ½C(x0² − x1²) + ½L(i0² − i1²).
      const lost = 0.5 * this.c * (x0 * x0 - x1 * x1) + 0.5 * this.l * (i0 * i0 - i1 * i1);
      const held = 0.5 * this.c * (x0 * x0 + x1 * x1) + 0.5 * this.l * (i0 * i0 + i1 * i1);
      if (lost >= 1e-4 * held) return lost / this.r;
    }
    const b = this.basis;
    if (b.kind === 'under' && b.omega * sEnd >= 1) return underI2(b.alpha, b.omega, this.i, sEnd);
    return this.quadrature(sEnd);
  }

  /** Composite Gauss–Legendre: geometric pieces toward s = 0, then ≤ 0.5 rad per piece. */
  private quadrature(sEnd: number): number {
    const b = this.basis;
    const rate =
      b.kind === 'under'
        ? Math.hypot(b.alpha, b.omega)
        : b.kind === 'critical'
          ? b.alpha
          : b.kind === 'nearOver'
            ? b.alpha + b.beta
            : b.kind === 'over'
              ? -b.s2
              : b.rate;
    const breaks = [sEnd];
    let s = sEnd;
    while (s * rate > 0.25 && breaks.length < 200) {
      s /= 2;
      breaks.unshift(s);
    }
    breaks.unshift(0);
    let sum = 0;
    for (let k = 0; k + 1 < breaks.length; k++) {
      const a = breaks[k];
      const len = breaks[k + 1] - a;
      const pieces = b.kind === 'under' ? Math.min(10_000, Math.max(1, Math.ceil((len * b.omega) / 0.5))) : 1;
      const h = len / pieces;
      for (let p = 0; p < pieces; p++) {
        for (let j = 0; j < GAUSS8.fractions.length; j++) {
          const i = this.current(a + p * h + GAUSS8.fractions[j] * h);
          sum += GAUSS8.weights[j] * h * i * i;
        }
      }
    }
    return sum;
  }
}

/**
 * ∫₀^S i² for i = e^(−αs)(p cos ωs + (q/ω) sin ωs) = Re(Z·e^(λs)), λ = −α + jω, Z = p − jq/ω:
 * i² = ½|Z|²e^(−2αs) + ½Re(Z²e^(2λs)), integrated term by term (well conditioned for ωS ≥ 1).
 */
function underI2(alpha: number, omega: number, coef: Coef, sEnd: number): number {
  const zr = coef[0];
  const zi = -coef[1] / omega;
  const mag2 = zr * zr + zi * zi;
  const first = alpha === 0 ? sEnd : -Math.expm1(-2 * alpha * sEnd) / (2 * alpha);
  // (e^(2λS) − 1)/(2λ)
  const wr = -2 * alpha;
  const wi = 2 * omega;
  const e = Math.exp(wr * sEnd);
  const nr = e * Math.cos(wi * sEnd) - 1;
  const ni = e * Math.sin(wi * sEnd);
  const den = wr * wr + wi * wi;
  const qr = (nr * wr + ni * wi) / den;
  const qi = (ni * wr - nr * wi) / den;
  const z2r = zr * zr - zi * zi;
  const z2i = 2 * zr * zi;
  return 0.5 * mag2 * first + 0.5 * (z2r * qr - z2i * qi);
}

export function closedFormApplies(design: Design): boolean {
  return !design.damping && !design.bleeder && !design.load && design.source.riseTime === 0;
}

interface Piece {
  response: SeriesResponse;
  t0: number;
  t1: number;
  group: Group;
}

/** First s in [0, sMax] where vC reaches the threshold, searching the monotone stretches. */
function firstCrossing(resp: SeriesResponse, threshold: number, direction: 1 | -1, sMax: number): number | null {
  const g = (s: number) => direction * (resp.vC(s) - threshold);
  if (g(0) >= 0) return 0;
  // Between extrema vC is monotone; with a decaying (or steady) ring, later stretches are nested
  // inside earlier ones, so the first two stretches decide it.
  const stops = [0, ...zeros(resp.basis, resp.i, sMax, 2), sMax];
  for (let k = 0; k + 1 < stops.length && k < 3; k++) {
    const a = stops[k];
    const b = stops[k + 1];
    const gb = g(b);
    if (gb >= 0) return brent(g, a, b, g(a), gb);
  }
  return null;
}

export interface ClosedFormRun {
  raw: RawRun;
  pieces: Piece[];
}

/** Runs the closed form; null when it does not apply to the design. */
export function runClosedForm(design: Design, settle: { target: number; direction: 1 | -1 } | null): ClosedFormRun | null {
  if (!closedFormApplies(design)) return null;
  const vs = design.source.voltage;
  const l = design.source.inductance + (design.filter?.inductance ?? 0);
  const c = design.capacitor.capacitance;
  const esr = design.capacitor.esr;
  const base = design.source.resistance + (design.filter?.resistance ?? 0) + esr;
  const T = design.duration;
  const pre = design.precharge;
  const bypass = pre?.bypass ?? null;
  const i0 = l > 0 ? design.initial.inductorCurrent : 0;
  const v0 = design.initial.capacitorVoltage;

  const pieces: Piece[] = [];
  let bypassCrossing: number | null = null;
  let bypassTime: number | null = null;
  if (!pre) {
    pieces.push({ response: new SeriesResponse(base, l, c, vs, esr, i0, v0), t0: 0, t1: T, group: 'plain' });
  } else {
    const first = new SeriesResponse(base + pre.resistance, l, c, vs, esr, i0, v0);
    if (bypass?.when === 'time') bypassTime = bypass.time;
    if (bypass?.when === 'voltage') {
      bypassCrossing = firstCrossing(first, bypass.fraction * vs, vs >= 0 ? 1 : -1, T);
      if (bypassCrossing !== null) bypassTime = bypassCrossing + bypass.delay;
    }
    const split = bypassTime !== null && bypassTime <= T ? bypassTime : null;
    if (split === null) {
      pieces.push({ response: first, t0: 0, t1: T, group: 'open' });
    } else {
      if (split > 0) pieces.push({ response: first, t0: 0, t1: split, group: 'open' });
      const iAt = split > 0 ? first.current(split) : i0;
      const vAt = split > 0 ? first.vC(split) : v0;
      pieces.push({ response: new SeriesResponse(base, l, c, vs, esr, l > 0 ? iAt : 0, vAt), t0: split, t1: T, group: 'after' });
    }
  }

  const collector = new Collector();
  let settleTime: number | null = null;
  for (const piece of pieces) {
    const { response: resp, t0, t1, group } = piece;
    const span = t1 - t0;
    const offer = (s: number) => collector.offerAll(resp.vC(s), resp.bus(s), resp.current(s), t0 + s, group);
    offer(0);
    offer(span);
    for (const s of zeros(resp.basis, resp.i, span)) collector.offerVC(resp.vC(s), t0 + s);
    for (const s of zeros(resp.basis, derivative(resp.basis, resp.xv), span)) collector.offerV(resp.bus(s), t0 + s);
    for (const s of zeros(resp.basis, resp.di, span)) collector.offerI(resp.current(s), t0 + s, group);
    collector.i2[group] += resp.i2(span);
    if (settle && settleTime === null) {
      const s = firstCrossing(resp, settle.target, settle.direction, span);
      if (s !== null) settleTime = t0 + s;
    }
  }
  const last = pieces[pieces.length - 1];
  const closedInRun = bypassTime !== null && bypassTime <= T;
  const residual = closedInRun && bypassTime !== null ? vs - (bypassTime > 0 ? pieces[0].response.vC(bypassTime) : v0) : null;
  const raw = collector.toRaw({
    bypassCrossingTime: bypassCrossing,
    bypassTime: closedInRun ? bypassTime : null,
    residualStep: residual,
    finalCapacitorVoltage: last.response.vC(last.t1 - last.t0),
    settleTime,
  });
  return { raw, pieces };
}

/** The closed-form state at time t: [i, vC, v]. */
export function closedFormStateAt(run: ClosedFormRun, t: number): [number, number, number] {
  let piece = run.pieces[0];
  for (const p of run.pieces) if (t >= p.t0) piece = p;
  const s = t - piece.t0;
  return [piece.response.current(s), piece.response.vC(s), piece.response.bus(s)];
}

/**
 * Metrics from the closed form alone, or null when the closed form does not apply. Cheap enough
 * (a few µs) to call for every sample of a spread analysis.
 */
export function closedFormMetrics(design: Design): Metrics | null {
  if (!closedFormApplies(design)) return null;
  const run = runClosedForm(design, settleTarget(design, steadyStateVoltage(design)));
  return run ? assembleMetrics(design, run.raw) : null;
}
