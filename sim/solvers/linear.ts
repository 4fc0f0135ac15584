/**
 * Exact propagation of the linear phases: z(t0 + s) = e^(M·s)·z(t0) with z = [i, vC, vD, 1, t], so a
 * ramped source is part of the homogeneous system and every phase is solved to rounding error,
 * however stiff it is.
 *
 * Each phase is scanned on a grid that starts at a fraction of the fastest time constant and
 * doubles its step once the elapsed time is ≥ 8 steps (so consecutive grid points are within 12.5 %
 * of each other near fast decays), capped at 1/24 of every oscillation period that is still alive
 * and at 1/16 of the phase. Doubling reuses e^(M·2h) = (e^(M·h))², so the grid costs a few matrix
 * products per level. On the grid:
 *  - derivative sign changes of vC, v and i (their derivatives are exact: row·M·z) bracket every
 *    extremum; a cubic check on the derivative's slope catches a pair of close roots inside one
 *    interval; brackets that could hold a maximum are refined by Brent's method on the exact
 *    derivative (never a sampled maximum);
 *  - ∫i² dt is 8-point Gauss–Legendre on each interval of the exact solution (degree-15 exact,
 *    the intervals are short against every live time scale);
 *  - the bypass threshold and the settle target are located by Brent on the exact vC.
 */
import { circuitOf, networkOf, linearSystem, sourceAt, type Circuit, type Network } from '../model/circuit';
import * as layout from '../model/layout';
import { configurationAt, configurationKey, fixedBypassTime, nextEventAfter } from '../model/schedule';
import type { Design } from '../design';
import { DesignError } from '../errors';
import { formatEng } from '../units';
import type { RawRun } from '../metrics';
import { Collector, type Group } from './collector';
import {
  balance,
  dot,
  doubleMinusIdentity,
  expmCounter,
  expmMinusIdentity,
  norm1,
  rowTimes,
  stepWith,
  type Matrix,
} from './expm';
import { GAUSS8 } from './quadrature';
import { brent, smallEigenvalues, type Complex } from './roots';

// Plain locals: module-namespace getters are slow in the hot loops.
const { I, N_AUG, ONE, VC, VD } = layout;

const N = N_AUG;
const OUT_VC = 0;
const OUT_V = 1;
const OUT_I = 2;
/** Grid steps per period of a live oscillation. */
const STEPS_PER_PERIOD = 24;
/** Initial step as a fraction of the fastest time constant. */
const INITIAL_STEP_FRACTION = 0.125;
/** An oscillation with α·t beyond this has decayed below rounding (e^−40 ≈ 4e−18). */
const DEAD_DECAY = 40;
/** Upper bound on grid intervals per run; beyond it the scan coarsens (and says so). */
const MAX_INTERVALS = 2_000_000;

/** row·z(σh) = Σ cₖσᵏ for σ in [0, 1], with cₖ = row·(hB)ᵏz/k!, summed until the terms vanish. */
function taylorCoefficients(ps: PhaseSystem, row: Float64Array, z: Float64Array, h: number): number[] {
  const coef: number[] = [];
  let w = new Float64Array(z);
  const size = Math.max(...Array.from(w, Math.abs)) || 1;
  for (let k = 0; k < 60; k++) {
    coef.push(dot(row, w, N));
    const next = new Float64Array(N);
    let biggest = 0;
    for (let r = 0; r < N; r++) {
      let sum = 0;
      for (let c = 0; c < N; c++) sum += ps.B[r * N + c] * w[c];
      next[r] = (sum * h) / (k + 1);
      biggest = Math.max(biggest, Math.abs(next[r]));
    }
    w = next;
    if (biggest <= 1e-18 * size) break;
  }
  return coef;
}

/** A phase's system in balanced coordinates: z = D·ẑ, ẑ' = B·ẑ. */
export interface PhaseSystem {
  net: Network;
  B: Matrix;
  d: Float64Array;
  /** Output rows in balanced coordinates: vC, v, i (then vD). */
  rows: Float64Array[];
  drows: Float64Array[];
  d2rows: Float64Array[];
  vD: Float64Array;
  eigenvalues: Complex[];
  /** Spectral radius of the physical part. */
  rho: number;
  /** ‖B‖₁, to tell when a Taylor series of e^(Bs) converges fast. */
  norm: number;
  oscillations: { omega: number; alpha: number }[];
}

function scaled(row: Float64Array, d: Float64Array): Float64Array {
  const out = new Float64Array(N);
  for (let k = 0; k < N; k++) out[k] = row[k] * d[k];
  return out;
}

export function prepareSystem(net: Network): PhaseSystem {
  const sys = linearSystem(net);
  const { B, d } = balance(sys.M, N);
  const rows = [sys.vC, sys.v, sys.i].map((row) => scaled(row, d));
  const drows = rows.map((row) => rowTimes(row, B, N));
  const d2rows = drows.map((row) => rowTimes(row, B, N));
  const active = [net.L > 0 ? I : -1, VC, net.hasDamping ? VD : -1].filter((k) => k >= 0);
  const sub = new Float64Array(active.length * active.length);
  active.forEach((r, a) => active.forEach((c, b) => (sub[a * active.length + b] = B[r * N + c])));
  const eigenvalues = smallEigenvalues(sub, active.length);
  let rho = 0;
  const oscillations: { omega: number; alpha: number }[] = [];
  for (const e of eigenvalues) {
    const magnitude = Math.hypot(e.re, e.im);
    rho = Math.max(rho, magnitude);
    if (e.im > 1e-9 * magnitude) oscillations.push({ omega: e.im, alpha: Math.max(0, -e.re) });
  }
  return { net, B, d, rows, drows, d2rows, vD: scaled(sys.vD, d), eigenvalues, rho, norm: norm1(B, N), oscillations };
}

export function toBalanced(z: ArrayLike<number>, d: Float64Array): Float64Array {
  const out = new Float64Array(N);
  for (let k = 0; k < N; k++) out[k] = z[k] / d[k];
  return out;
}

export function fromBalanced(zHat: ArrayLike<number>, d: Float64Array): Float64Array {
  const out = new Float64Array(N);
  for (let k = 0; k < N; k++) out[k] = zHat[k] * d[k];
  return out;
}

/** State (balanced) at t0 + s from the state at t0. */
export function propagate(ps: PhaseSystem, zHat: Float64Array, s: number): Float64Array {
  if (s === 0) return new Float64Array(zHat);
  return stepWith(expmMinusIdentity(ps.B, N, s), zHat, N);
}

/**
 * The value of the Hermite cubic through (0, fa), (1, fb) with slopes ga, gb at its interior
 * stationary point closest to (or across) zero, signed like fa; min(|fa|, |fb|)·sign(fa) if none.
 */
function cubicClosestToZero(fa: number, fb: number, ga: number, gb: number): number {
  const c2 = 3 * (fb - fa) - 2 * ga - gb;
  const c3 = 2 * (fa - fb) + ga + gb;
  const sign = Math.sign(fa);
  let best = sign * Math.min(Math.abs(fa), Math.abs(fb));
  const consider = (s: number) => {
    if (!(s > 0 && s < 1)) return;
    const p = fa + s * (ga + s * (c2 + s * c3));
    if (sign * p < sign * best) best = p;
  };
  if (c3 === 0) {
    if (c2 !== 0) consider(-ga / (2 * c2));
  } else {
    const disc = c2 * c2 - 3 * c3 * ga;
    if (disc >= 0) {
      const root = Math.sqrt(disc);
      consider((-c2 + root) / (3 * c3));
      consider((-c2 - root) / (3 * c3));
    }
  }
  return best;
}

interface Bracket {
  output: number;
  kind: 1 | -1;
  group: Group;
  ps: PhaseSystem;
  t: number;
  z: Float64Array;
  h: number;
  potential: number;
}

export interface Watch {
  threshold: number;
  direction: 1 | -1;
}

export interface LinearCounters {
  phases: number;
  intervals: number;
  expm: number;
  brackets: number;
  refined: number;
  coarsened: boolean;
}

interface ScanRequest {
  ps: PhaseSystem;
  t0: number;
  z0: Float64Array;
  tEnd: number;
  group: Group;
  bypass: (Watch & { delay: number }) | null;
  settle: Watch | null;
}

interface ScanResult {
  tEnd: number;
  zEnd: Float64Array;
  bypassCrossing: number | null;
  settleCrossing: number | null;
}

/** Largest grid step allowed at elapsed time e into the phase. */
/**
 * Grid intervals a phase needs to resolve every oscillation while it is alive. A run that would
 * need more than MAX_INTERVALS is refused up front (naming `duration`): resolving ~10⁵ periods of
 * a ring is minutes of work, and coarsening the grid instead would give metrics no one can trust.
 */
function assertResolvable(ps: PhaseSystem, length: number): void {
  let needed = 0;
  let fastest = 0;
  for (const { omega, alpha } of ps.oscillations) {
    const live = alpha > 0 ? Math.min(length, DEAD_DECAY / alpha) : length;
    needed += ((live * omega) / (2 * Math.PI)) * STEPS_PER_PERIOD;
    fastest = Math.max(fastest, omega);
  }
  if (needed > MAX_INTERVALS) {
    const frequency = fastest / (2 * Math.PI);
    const periods = needed / STEPS_PER_PERIOD;
    const longest = (length * MAX_INTERVALS) / needed;
    throw new DesignError(
      `is too long for this circuit: it rings at ${formatEng(frequency, 'Hz')} for about ${periods.toExponential(1)} periods, more than the engine resolves in one run; shorten the duration to about ${formatEng(longest, 's')} or less, or add damping`,
      'duration',
    );
  }
}

function maxStep(ps: PhaseSystem, length: number, elapsed: number): number {
  let cap = length / 16;
  for (const { omega, alpha } of ps.oscillations) {
    if (alpha * elapsed < DEAD_DECAY) cap = Math.min(cap, (2 * Math.PI) / omega / STEPS_PER_PERIOD);
  }
  return cap;
}

class LinearScanner {
  readonly collector = new Collector();
  readonly brackets: Bracket[] = [];
  readonly counters: LinearCounters = { phases: 0, intervals: 0, expm: 0, brackets: 0, refined: 0, coarsened: false };

  /** Outputs and their first two derivatives at a balanced state. */
  private outputs(ps: PhaseSystem, z: Float64Array, into: Float64Array): void {
    for (let k = 0; k < 3; k++) {
      into[k] = dot(ps.rows[k], z, N);
      into[3 + k] = dot(ps.drows[k], z, N);
      into[6 + k] = dot(ps.d2rows[k], z, N);
    }
  }

  private offer(values: Float64Array, t: number, group: Group): void {
    this.collector.offerAll(values[OUT_VC], values[OUT_V], values[OUT_I], t, group);
  }

  /**
   * Finds s in [0, h] where row·e^(B s)·z crosses `level`, given the values at the ends. On a short
   * interval (‖B‖·h ≤ 1) the exact solution is its Taylor series, z(σh) = Σ σᵏ·(hB)ᵏz/k!, summed to
   * rounding: Brent then runs on a polynomial. Otherwise each iterate propagates with e^(Bs).
   */
  private root(ps: PhaseSystem, row: Float64Array, z: Float64Array, level: number, h: number, fa: number, fb: number): number {
    if (ps.norm * h <= 1) {
      const coef = taylorCoefficients(ps, row, z, h);
      coef[0] -= level;
      const p = (sigma: number) => {
        let sum = 0;
        for (let k = coef.length - 1; k >= 0; k--) sum = sum * sigma + coef[k];
        return sum;
      };
      const p0 = p(0);
      const p1 = p(1);
      if ((p0 <= 0 && p1 >= 0) || (p0 >= 0 && p1 <= 0)) return h * brent(p, 0, 1, p0, p1);
    }
    const f = (s: number) => dot(row, propagate(ps, z, s), N) - level;
    return brent(f, 0, h, fa - level, fb - level);
  }

  /** Records extremum brackets on [a, a + h]; returns the refined vC extremum there, if asked. */
  private bracket(
    ps: PhaseSystem,
    group: Group,
    a: number,
    za: Float64Array,
    h: number,
    va: Float64Array,
    vb: Float64Array,
  ): void {
    for (let k = 0; k < 3; k++) {
      const fa = va[3 + k];
      const fb = vb[3 + k];
      const kinds: (1 | -1)[] = k === OUT_V ? [1] : [1, -1];
      if ((fa > 0 && fb < 0) || (fa < 0 && fb > 0)) {
        const kind: 1 | -1 = fa > 0 ? 1 : -1;
        if (kinds.includes(kind)) this.push(ps, k, kind, group, a, za, h, va, vb);
        continue;
      }
      // Same signs: could the derivative dip through zero and back inside? Hermite cubic check.
      const ga = va[6 + k] * h;
      const gb = vb[6 + k] * h;
      if (fa === 0 || fb === 0 || Math.sign(ga) === Math.sign(gb)) continue;
      if (Math.sign(ga) === Math.sign(fa)) continue; // moving away from zero first
      const dip = cubicClosestToZero(fa, fb, ga, gb);
      if (dip * Math.sign(fa) > 0.5 * Math.min(Math.abs(fa), Math.abs(fb))) continue;
      // Precise: the derivative's own extremum, by Brent on the second derivative.
      const s = this.root(ps, ps.d2rows[k], za, 0, h, va[6 + k], vb[6 + k]);
      const zs = propagate(ps, za, s);
      const fs = dot(ps.drows[k], zs, N);
      if (Math.sign(fs) === Math.sign(fa) || fs === 0) continue;
      const vs = new Float64Array(9);
      this.outputs(ps, zs, vs);
      const first: 1 | -1 = fa > 0 ? 1 : -1;
      if (kinds.includes(first)) this.push(ps, k, first, group, a, za, s, va, vs);
      const second: 1 | -1 = first === 1 ? -1 : 1;
      if (kinds.includes(second)) this.push(ps, k, second, group, a + s, zs, h - s, vs, vb);
    }
  }

  private push(
    ps: PhaseSystem,
    output: number,
    kind: 1 | -1,
    group: Group,
    t: number,
    z: Float64Array,
    h: number,
    va: Float64Array,
    vb: Float64Array,
  ): void {
    const slope = Math.max(Math.abs(va[3 + output]), Math.abs(vb[3 + output]));
    const edge = kind === 1 ? Math.max(va[output], vb[output]) : Math.min(va[output], vb[output]);
    this.brackets.push({ output, kind, group, ps, t, z: new Float64Array(z), h, potential: edge + kind * 2 * h * slope });
    this.counters.brackets++;
  }

  /** The extremum inside a bracket, by Brent on the exact derivative. */
  refineBracket(b: Bracket): { time: number; value: number; z: Float64Array } {
    const fa = dot(b.ps.drows[b.output], b.z, N);
    const zb = propagate(b.ps, b.z, b.h);
    const fb = dot(b.ps.drows[b.output], zb, N);
    const s = this.root(b.ps, b.ps.drows[b.output], b.z, 0, b.h, fa, fb);
    const zs = propagate(b.ps, b.z, s);
    this.counters.refined++;
    return { time: b.t + s, value: dot(b.ps.rows[b.output], zs, N), z: zs };
  }

  /** First crossing of a watch on [a, a + h], or null. */
  private crossing(
    watch: Watch,
    ps: PhaseSystem,
    a: number,
    za: Float64Array,
    h: number,
    va: Float64Array,
    vb: Float64Array,
  ): number | null {
    const ga = watch.direction * (va[OUT_VC] - watch.threshold);
    const gb = watch.direction * (vb[OUT_VC] - watch.threshold);
    if (ga >= 0) return a;
    if (gb >= 0) return a + this.root(ps, ps.rows[OUT_VC], za, watch.threshold, h, va[OUT_VC], vb[OUT_VC]);
    // Both below: an excursion toward the threshold that turns back inside the interval?
    const fa = watch.direction * va[3 + OUT_VC];
    const fb = watch.direction * vb[3 + OUT_VC];
    if (!(fa > 0 && fb < 0)) return null;
    const reach = Math.max(ga, gb) + 2 * h * Math.max(Math.abs(fa), Math.abs(fb));
    if (reach < 0) return null;
    const s = this.root(ps, ps.drows[OUT_VC], za, 0, h, va[3 + OUT_VC], vb[3 + OUT_VC]);
    const zs = propagate(ps, za, s);
    const top = dot(ps.rows[OUT_VC], zs, N);
    if (watch.direction * (top - watch.threshold) < 0) return null;
    return a + this.root(ps, ps.rows[OUT_VC], za, watch.threshold, s, va[OUT_VC], top);
  }

  /** ∫ i² dt over [a, a + h] from precomputed rows (i-row times the node propagators). */
  private integrate(nodeRows: Float64Array[], z: Float64Array, h: number): number {
    let sum = 0;
    for (let j = 0; j < nodeRows.length; j++) {
      const i = dot(nodeRows[j], z, N);
      sum += GAUSS8.weights[j] * i * i;
    }
    return sum * h;
  }

  /** i at the Gauss nodes as rows over the interval's start state: rowI·(I + E_j). */
  private nodeRows(ps: PhaseSystem, nodes: Matrix[]): Float64Array[] {
    return nodes.map((e) => {
      const row = rowTimes(ps.rows[OUT_I], e, N);
      for (let k = 0; k < N; k++) row[k] += ps.rows[OUT_I][k];
      return row;
    });
  }

  scan(request: ScanRequest): ScanResult {
    const { ps, t0, group } = request;
    this.counters.phases++;
    let end = request.tEnd;
    const length = end - t0;
    let bypassCrossing: number | null = null;
    let settleCrossing: number | null = null;
    const va = new Float64Array(9);
    const vb = new Float64Array(9);
    let za: Float64Array = new Float64Array(request.z0);
    this.outputs(ps, za, va);
    this.offer(va, t0, group);
    if (request.bypass && request.bypass.direction * (va[OUT_VC] - request.bypass.threshold) >= 0) {
      bypassCrossing = t0;
      end = Math.min(end, t0 + request.bypass.delay);
    }
    if (request.settle && request.settle.direction * (va[OUT_VC] - request.settle.threshold) >= 0) settleCrossing = t0;
    if (!(end > t0)) return { tEnd: t0, zEnd: za, bypassCrossing, settleCrossing };

    assertResolvable(ps, end - t0);
    let h = Math.min(ps.rho > 0 ? INITIAL_STEP_FRACTION / ps.rho : length / 16, maxStep(ps, length, 0), length / 16);
    // Never below what the time axis can resolve at t0 (a mode faster than that is over at once).
    h = Math.max(h, 64 * Number.EPSILON * Math.abs(t0));
    // Step matrices are kept as e^(Bh) − I (see expmMinusIdentity) and doubled in that form.
    let stepE = expmMinusIdentity(ps.B, N, h);
    let nodes = GAUSS8.fractions.map((f) => expmMinusIdentity(ps.B, N, h * f));
    let rows = this.nodeRows(ps, nodes);
    let a = t0;
    while (a < end) {
      let b = a + h;
      let step = h;
      let zb: Float64Array;
      let truncated = false;
      if (b >= end - 1e-15 * Math.abs(end) || !(b > a)) {
        b = end;
        step = end - a;
        truncated = step !== h;
      }
      zb = truncated ? propagate(ps, za, step) : stepWith(stepE, za, N);
      this.outputs(ps, zb, vb);

      if (request.bypass && bypassCrossing === null) {
        const tc = this.crossing(request.bypass, ps, a, za, step, va, vb);
        if (tc !== null) {
          bypassCrossing = tc;
          const close = tc + request.bypass.delay;
          if (close < end) end = close;
          if (close < b) {
            b = close;
            step = close - a;
            truncated = true;
            zb = propagate(ps, za, step);
            this.outputs(ps, zb, vb);
          }
        }
      }
      if (step > 0) {
        this.counters.intervals++;
        if (request.settle && settleCrossing === null) settleCrossing = this.crossing(request.settle, ps, a, za, step, va, vb);
        this.bracket(ps, group, a, za, step, va, vb);
        const nodeRows = truncated
          ? this.nodeRows(
              ps,
              GAUSS8.fractions.map((f) => expmMinusIdentity(ps.B, N, step * f)),
            )
          : rows;
        this.collector.i2[group] += this.integrate(nodeRows, za, step);
        this.offer(vb, b, group);
      }
      a = b;
      za = zb;
      va.set(vb);
      if (this.counters.intervals > MAX_INTERVALS) this.counters.coarsened = true;
      const elapsed = a - t0;
      if (!truncated && (this.counters.coarsened || (elapsed >= 8 * h && 2 * h <= maxStep(ps, length, elapsed)))) {
        stepE = doubleMinusIdentity(stepE, N);
        nodes = nodes.map((m) => doubleMinusIdentity(m, N));
        rows = this.nodeRows(ps, nodes);
        h *= 2;
      }
    }
    return { tEnd: end, zEnd: za, bypassCrossing, settleCrossing };
  }

  /** Refines every bracket that could hold a maximum (minimum) beating what was sampled. */
  refineAll(): void {
    this.brackets.sort((x, y) => x.t - y.t);
    const c = this.collector;
    for (const b of this.brackets) {
      const pickers =
        b.output === OUT_VC
          ? [b.kind === 1 ? c.vCMax : c.vCMin]
          : b.output === OUT_V
            ? [c.vMax]
            : b.kind === 1
              ? [c.iMax.all, ...(b.group !== 'plain' ? [c.iMax[b.group]] : [])]
              : [c.iMin.all, ...(b.group !== 'plain' ? [c.iMin[b.group]] : [])];
      const useful = pickers.some((p) => {
        const best = p.bestValue;
        const tol = 1e-9 * Math.abs(best);
        return b.kind === 1 ? b.potential >= best - tol : b.potential <= best + tol;
      });
      if (!useful) continue;
      const found = this.refineBracket(b);
      if (b.output === OUT_VC) c.offerVC(found.value, found.time);
      else if (b.output === OUT_V) c.offerV(found.value, found.time);
      else c.offerI(found.value, found.time, b.group);
    }
  }
}

/** One phase of an exact run, kept for sampling the waveform afterwards. */
export interface LinearPhase {
  ps: PhaseSystem;
  t0: number;
  t1: number;
  z0: Float64Array;
  group: Group;
}

export interface LinearRun {
  raw: RawRun;
  phases: LinearPhase[];
  counters: LinearCounters;
  warnings: string[];
}

export interface RunOptions {
  settle: Watch | null;
}

/** The whole run with exact propagation (the design must have no constant-power load). */
export function runLinear(design: Design, options: RunOptions): LinearRun {
  const circuit = circuitOf(design);
  return runLinearCircuit(circuit, options);
}

export function runLinearCircuit(circuit: Circuit, options: RunOptions): LinearRun {
  const startExpm = expmCalls();
  const scanner = new LinearScanner();
  const cache = new Map<string, PhaseSystem>();
  const phases: LinearPhase[] = [];
  const warnings: string[] = [];
  const bypass = circuit.prechargeResistance !== null ? circuit.bypass : null;
  const voltageBypass = bypass?.when === 'voltage' ? bypass : null;
  let bypassTime = fixedBypassTime(circuit);
  let bypassCrossing: number | null = null;
  let settleTime: number | null = null;
  let residualStep: number | null = null;
  let z: Float64Array = new Float64Array([circuit.initial[0], circuit.initial[1], circuit.initial[2], 1, 0]);
  let t = 0;
  const T = circuit.duration;
  let guard = 0;
  while (t < T && guard++ < 64) {
    if (bypassTime !== null && residualStep === null && t >= bypassTime) {
      residualStep = sourceAt(networkOf(circuit, configurationAt(circuit, t, bypassTime)), t) - z[VC];
    }
    const config = configurationAt(circuit, t, bypassTime);
    const key = configurationKey(config);
    let ps = cache.get(key);
    if (!ps) {
      ps = prepareSystem(networkOf(circuit, config));
      cache.set(key, ps);
    }
    const group: Group = circuit.prechargeResistance === null ? 'plain' : config.bypassClosed ? 'after' : 'open';
    const tNext = nextEventAfter(circuit, t, bypassTime);
    const watchBypass = voltageBypass && bypassCrossing === null && !config.bypassClosed;
    const z0 = toBalanced(z, ps.d);
    const result = scanner.scan({
      ps,
      t0: t,
      z0,
      tEnd: tNext,
      group,
      bypass: watchBypass
        ? {
            threshold: voltageBypass.fraction * circuit.sourceVoltage,
            direction: circuit.sourceVoltage >= 0 ? 1 : -1,
            delay: voltageBypass.delay,
          }
        : null,
      settle: settleTime === null ? options.settle : null,
    });
    phases.push({ ps, t0: t, t1: result.tEnd, z0, group });
    if (result.settleCrossing !== null && settleTime === null) settleTime = result.settleCrossing;
    if (watchBypass && result.bypassCrossing !== null) {
      bypassCrossing = result.bypassCrossing;
      bypassTime = bypassCrossing + voltageBypass.delay;
    }
    z = fromBalanced(result.zEnd, ps.d);
    z[ONE] = 1;
    t = result.tEnd;
  }
  // A bypass closing exactly at the end of the run: its instant is the whole "after" phase.
  if (bypassTime !== null && bypassTime <= T && !scanner.collector.iMax.after.has && circuit.prechargeResistance !== null) {
    const ps = prepareSystem(networkOf(circuit, configurationAt(circuit, T, bypassTime)));
    const zHat = toBalanced(z, ps.d);
    scanner.collector.offerI(dot(ps.rows[OUT_I], zHat, N), T, 'after');
    if (residualStep === null) residualStep = sourceAt(ps.net, T) - z[VC];
  }
  scanner.refineAll();
  if (scanner.counters.coarsened)
    warnings.push('the run is very long against its fastest oscillation; the extremum grid was coarsened');
  const closedInRun = bypassTime !== null && bypassTime <= T;
  const raw = scanner.collector.toRaw({
    bypassCrossingTime: bypassCrossing,
    bypassTime: closedInRun ? bypassTime : null,
    residualStep: closedInRun ? residualStep : null,
    finalCapacitorVoltage: z[VC],
    settleTime,
  });
  scanner.counters.expm = expmCalls() - startExpm;
  return { raw, phases, counters: scanner.counters, warnings };
}

function expmCalls(): number {
  return expmCounter.calls;
}

/** Samples of the exact solution at the given (sorted) times. */
export interface Samples {
  t: number[];
  vC: number[];
  v: number[];
  i: number[];
  vD: number[];
  /** Precharge resistor power Rpre·i² while it carries the current, else 0. */
  prechargePower: number[];
}

export function emptySamples(): Samples {
  return { t: [], vC: [], v: [], i: [], vD: [], prechargePower: [] };
}

/**
 * The exact solution at sorted times. Consecutive samples of one phase step by e^(M·Δ), re-anchored
 * from the phase start every 256 samples so that rounding cannot accumulate.
 */
export function sampleLinear(run: LinearRun, times: number[], prechargeResistance: number | null): Samples {
  const n = times.length;
  // Packed arrays grown by push: a preallocated `new Array(n)` of this size would be holey (slow).
  const out: Samples = { t: [], vC: [], v: [], i: [], vD: [], prechargePower: [] };
  let p = 0;
  let k = 0;
  while (k < n) {
    while (p < run.phases.length - 1 && times[k] >= run.phases[p].t1) p++;
    const phase = run.phases[p];
    const { ps } = phase;
    const [rowVC, rowV, rowI] = ps.rows;
    const rowVD = ps.vD;
    const power = phase.group === 'open' && prechargeResistance !== null ? prechargeResistance : 0;
    const last = p === run.phases.length - 1;
    let count = 0;
    let z: Float64Array = new Float64Array(N);
    let spare: Float64Array = new Float64Array(N);
    // The time the stepped state stands for; a uniform grid steps by one fixed e^(BΔ) − I.
    let modelTime = 0;
    let stepMatrix: Matrix | null = null;
    let stepSize = 0;
    while (k < n && (last || times[k] < phase.t1)) {
      const t = times[k];
      const dt = t - modelTime;
      if (count > 0 && count % 256 !== 0 && dt > 0) {
        if (stepMatrix === null || Math.abs(dt - stepSize) > 1e-9 * stepSize) {
          stepMatrix = expmMinusIdentity(ps.B, N, dt);
          stepSize = dt;
          modelTime = t;
        } else {
          modelTime += stepSize;
        }
        stepWith(stepMatrix, z, N, spare);
        const swap = z;
        z = spare;
        spare = swap;
      } else {
        z = propagate(ps, phase.z0, t - phase.t0);
        modelTime = t;
      }
      count++;
      let vC = 0;
      let v = 0;
      let i = 0;
      let vD = 0;
      for (let c = 0; c < N; c++) {
        const x = z[c];
        vC += rowVC[c] * x;
        v += rowV[c] * x;
        i += rowI[c] * x;
        vD += rowVD[c] * x;
      }
      out.t.push(t);
      out.vC.push(vC);
      out.v.push(v);
      out.i.push(i);
      out.vD.push(vD);
      out.prechargePower.push(power * i * i);
      k++;
    }
  }
  return out;
}

/** The exact state (unbalanced [i, vC, vD, 1, t]) at time t, for tests and cross-checks. */
export function linearStateAt(run: LinearRun, t: number): Float64Array {
  let phase = run.phases[0];
  for (const p of run.phases) if (t >= p.t0) phase = p;
  return fromBalanced(propagate(phase.ps, phase.z0, t - phase.t0), phase.ps.d);
}
