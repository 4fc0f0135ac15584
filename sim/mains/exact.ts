/**
 * Exact propagation of the linear pieces (fixed limiter resistance, no constant-power load):
 * ẑ(t0 + s) = e^(B·s)·ẑ(t0) over z = [i, vC, vD, 1, sin ωt, cos ωt] (model.ts), in balanced
 * coordinates (Parlett–Reinsch, sim/solvers/expm.ts). The sinusoidal source is inside the state, so
 * every piece is solved to rounding error however stiff it is (a small line inductance with a large
 * capacitor costs nothing extra).
 *
 * Each piece is scanned on a grid that starts at 1/8 of the fastest time constant and doubles once
 * the elapsed time is ≥ 8 steps (as the engine's linear solver does, sim/solvers/linear.ts), capped
 * at 1/360 of a mains cycle and 1/24 of any oscillation period. The step matrices are kept as
 * e^(Bh) − I and doubled in that form. On each grid interval:
 *  - the piece's event function (i while conducting, e_p − v while blocking) is watched for a sign
 *    change, and for an excursion that turns back inside the interval (its derivative changes sign:
 *    the turning point is found and tested); the crossing is located by Brent's method on the
 *    exact solution, to rounding in time;
 *  - derivative sign changes of i, vC and v bracket their extrema, refined by Brent on the exact
 *    derivative where they could beat what is known;
 *  - ∫i² dt by 8-point Gauss–Legendre on the exact solution (exact to degree 15 on intervals short
 *    against every time scale of the piece).
 * Inside an interval the exact solution is evaluated from the Taylor series of e^(Bs)·ẑ, summed to
 * rounding (‖B‖₁·s ≤ 2 and the series' remainder below 1e−17), which makes the root finding cheap;
 * beyond that radius it falls back to the matrix exponential.
 */
import * as expmModule from '../solvers/expm';
import * as quadrature from '../solvers/quadrature';
import * as roots from '../solvers/roots';
import type { Matrix } from '../solvers/expm';
import { rectifiedSource } from './bridge';
import { drive, watchScales, WATCH_FLOOR, type PieceSolver, type Probe } from './driver';
import {
  augment,
  configurationKey,
  exactSystem,
  Z_COS,
  Z_I,
  Z_N,
  Z_ONE,
  Z_SIN,
  Z_VC,
  Z_VD,
  type Configuration,
  type MainsModel,
} from './model';
import { Recorder, rawOf, type CurrentGroup, type MainsRaw, type SampleRow } from './record';

// Plain locals: module-namespace getters are slow in the hot loops.
const { balance, dot, doubleMinusIdentity, expmMinusIdentity, norm1, rowTimes, stepWith } = expmModule;
const { brent, smallEigenvalues } = roots;
const GAUSS = quadrature.GAUSS8;

const N = Z_N;
/** Output indices, with derivative rows at +OUTPUTS and second derivatives at +2·OUTPUTS. */
const O_I = 0;
const O_VC = 1;
const O_V = 2;
const O_G = 3;
const OUTPUTS = 4;
export const STEPS_PER_CYCLE = 360;
const STEPS_PER_OSCILLATION = 24;
const INITIAL_STEP_FRACTION = 0.125;
/** Taylor series radius (‖B‖₁·s) and length. */
const SERIES_RADIUS = 2;
const SERIES_TERMS = 40;

interface Level {
  h: number;
  E: Matrix;
  iNodes: Float64Array[];
  nodes: Matrix[];
}

interface PieceSystem {
  config: Configuration;
  B: Matrix;
  d: Float64Array;
  norm: number;
  rows: Float64Array[];
  drows: Float64Array[];
  d2rows: Float64Array[];
  rho: number;
  cap: number;
  levels: Level[];
  /** Step matrices for waveform sampling, by step size. */
  sampling: Map<number, Matrix>;
}

export interface ExactCounters {
  pieces: number;
  intervals: number;
  expm: number;
  brackets: number;
  refined: number;
}

interface StoredPiece {
  sys: PieceSystem;
  t0: number;
  t1: number;
  z0: Float64Array;
}

export interface ExactRun {
  ok: boolean;
  failure: string | null;
  raw: MainsRaw | null;
  counters: ExactCounters;
  /** Waveform rows at sorted times. */
  sample: (times: number[]) => SampleRow[];
}

/**
 * The exact solution inside one interval from its start state: Taylor series when the interval is
 * within the series radius, else the matrix exponential.
 */
class Local {
  private readonly powers: Float64Array[] = Array.from({ length: SERIES_TERMS + 1 }, () => new Float64Array(N));
  private terms = 0;
  private sys: PieceSystem | null = null;
  private z: Float64Array = new Float64Array(N);
  private useSeries = false;

  constructor(private readonly counters: ExactCounters) {}

  load(sys: PieceSystem, z: Float64Array, h: number): void {
    this.sys = sys;
    this.z = z;
    const x = sys.norm * h;
    this.useSeries = x <= SERIES_RADIUS;
    this.terms = 0;
    if (!this.useSeries) return;
    // Terms until x^k/k! < 1e−17 (the remainder is then below it too, for x ≤ 2).
    let term = 1;
    let k = 0;
    while (k < SERIES_TERMS && term > 1e-17) {
      k++;
      term *= x / k;
    }
    this.terms = k + 1;
    this.powers[0].set(z);
    for (let j = 1; j <= this.terms; j++) {
      const prev = this.powers[j - 1];
      const out = this.powers[j];
      const B = sys.B;
      for (let r = 0; r < N; r++) {
        let sum = 0;
        for (let c = 0; c < N; c++) sum += B[r * N + c] * prev[c];
        out[r] = sum;
      }
    }
  }

  /** ẑ(s) into `out`. */
  at(s: number, out: Float64Array = new Float64Array(N)): Float64Array {
    const sys = this.sys as PieceSystem;
    if (s === 0) {
      out.set(this.z);
      return out;
    }
    if (!this.useSeries) {
      this.counters.expm++;
      return stepWith(expmMinusIdentity(sys.B, N, s), this.z, N, out);
    }
    const K = this.terms;
    out.set(this.powers[K]);
    for (let k = K - 1; k >= 0; k--) {
      const f = s / (k + 1);
      const p = this.powers[k];
      for (let r = 0; r < N; r++) out[r] = p[r] + f * out[r];
    }
    return out;
  }
}

function groupOf(model: MainsModel, config: Configuration): CurrentGroup {
  return model.limiter.kind === 'none' ? 'plain' : config.limiterIn ? 'limited' : 'bypassed';
}

export function runExact(model: MainsModel): ExactRun {
  const recorder = new Recorder();
  const counters: ExactCounters = { pieces: 0, intervals: 0, expm: 0, brackets: 0, refined: 0 };
  const cache = new Map<string, PieceSystem>();
  const stored: StoredPiece[] = [];
  const period = (2 * Math.PI) / model.bridge.omega;
  const local = new Local(counters);
  const scratch = new Float64Array(N);

  const expm1 = (B: Matrix, h: number): Matrix => {
    counters.expm++;
    return expmMinusIdentity(B, N, h);
  };
  const propagate = (sys: PieceSystem, z: Float64Array, s: number): Float64Array =>
    s === 0 ? new Float64Array(z) : stepWith(expm1(sys.B, s), z, N);

  const systemOf = (config: Configuration): PieceSystem => {
    const key = configurationKey(config);
    const hit = cache.get(key);
    if (hit) return hit;
    const rows = exactSystem(model, config);
    const { B, d } = balance(rows.M, N);
    const scaled = (row: Float64Array) => row.map((x, k) => x * d[k]);
    const values = [rows.i, rows.vC, rows.v, rows.g].map(scaled);
    const drows = values.map((row) => rowTimes(row, B, N));
    const d2rows = drows.map((row) => rowTimes(row, B, N));
    const active = [config.conducting && model.L > 0 ? Z_I : -1, Z_VC, model.damping ? Z_VD : -1].filter((k) => k >= 0);
    const sub = new Float64Array(active.length * active.length);
    active.forEach((r, a) => active.forEach((c, b) => (sub[a * active.length + b] = B[r * N + c])));
    let rho = 0;
    let cap = period / STEPS_PER_CYCLE;
    for (const e of smallEigenvalues(sub, active.length)) {
      const magnitude = Math.hypot(e.re, e.im);
      rho = Math.max(rho, magnitude);
      if (e.im > 1e-9 * magnitude) cap = Math.min(cap, (2 * Math.PI) / e.im / STEPS_PER_OSCILLATION);
    }
    const sys: PieceSystem = {
      config,
      B,
      d,
      norm: norm1(B, N),
      rows: values,
      drows,
      d2rows,
      rho,
      cap,
      levels: [],
      sampling: new Map(),
    };
    cache.set(key, sys);
    return sys;
  };

  const nodeRows = (sys: PieceSystem, nodes: Matrix[]): Float64Array[] =>
    nodes.map((e) => {
      const row = rowTimes(sys.rows[O_I], e, N);
      for (let k = 0; k < N; k++) row[k] += sys.rows[O_I][k];
      return row;
    });

  const levelOf = (sys: PieceSystem, k: number): Level => {
    while (sys.levels.length <= k) {
      const previous = sys.levels[sys.levels.length - 1];
      let level: Level;
      if (!previous) {
        const h = Math.min(sys.cap, sys.rho > 0 ? INITIAL_STEP_FRACTION / sys.rho : sys.cap);
        const nodes = GAUSS.fractions.map((f) => expm1(sys.B, h * f));
        level = { h, E: expm1(sys.B, h), nodes, iNodes: [] };
      } else {
        level = {
          h: 2 * previous.h,
          E: doubleMinusIdentity(previous.E, N),
          nodes: previous.nodes.map((m) => doubleMinusIdentity(m, N)),
          iNodes: [],
        };
      }
      level.iNodes = nodeRows(sys, level.nodes);
      sys.levels.push(level);
    }
    return sys.levels[k];
  };

  const outputs = (sys: PieceSystem, z: Float64Array, into: Float64Array) => {
    for (let k = 0; k < OUTPUTS; k++) {
      into[k] = dot(sys.rows[k], z, N);
      into[OUTPUTS + k] = dot(sys.drows[k], z, N);
      into[2 * OUTPUTS + k] = dot(sys.d2rows[k], z, N);
    }
  };

  const toBalanced = (sys: PieceSystem, z: ArrayLike<number>) => {
    const out = new Float64Array(N);
    for (let k = 0; k < N; k++) out[k] = z[k] / sys.d[k];
    return out;
  };
  const fromBalanced = (sys: PieceSystem, zHat: ArrayLike<number>) => {
    const out = new Float64Array(N);
    for (let k = 0; k < N; k++) out[k] = zHat[k] * sys.d[k];
    return out;
  };

  /** Root of row·ẑ(s) − level on [lo, hi] from the loaded interval, given the values (less the level) at the ends. */
  const root = (row: Float64Array, lo: number, hi: number, fa: number, fb: number, offset = 0) =>
    brent((s) => dot(row, local.at(s, scratch), N) - offset, lo, hi, fa, fb);
  const scales = watchScales(model);

  const solver: PieceSolver<Float64Array> = {
    failure: null,
    probe(config, t, z): Probe {
      const sys = systemOf(config);
      const values = new Float64Array(3 * OUTPUTS);
      outputs(sys, toBalanced(sys, z), values);
      return { i: values[O_I], di: values[OUTPUTS + O_I], g: values[O_G], dg: values[OUTPUTS + O_G] };
    },
    enter(config, t, z, fromConducting) {
      const out = augment(model, t, z[Z_I], z[Z_VC], z[Z_VD]);
      if (!config.conducting || !fromConducting) out[Z_I] = 0;
      return out;
    },
    run(config, t0, z, tEnd) {
      const sys = systemOf(config);
      counters.pieces++;
      const group = groupOf(model, config);
      const conducting = config.conducting;
      // Re-anchor the sinusoid at the piece start so that rounding cannot accumulate over cycles.
      const x = model.bridge.omega * t0;
      const start = new Float64Array(z);
      start[Z_ONE] = 1;
      start[Z_SIN] = Math.sin(x);
      start[Z_COS] = Math.cos(x);
      if (!conducting) start[Z_I] = 0;
      let za = toBalanced(sys, start);
      let zb = new Float64Array(N);
      const zStart = new Float64Array(za);
      let va = new Float64Array(3 * OUTPUTS);
      let vb = new Float64Array(3 * OUTPUTS);
      outputs(sys, za, va);
      let pieceI2 = 0;
      let piecePeak = conducting ? Math.max(0, va[O_I]) : 0;
      recorder.offerCurrent(conducting ? va[O_I] : 0, t0, group);
      recorder.offerVoltages(va[O_VC], va[O_V], t0);
      let k = 0;
      let level = levelOf(sys, 0);
      let a = t0;
      let first = true;
      let hit = false;
      // The piece's event: the current reaching 0 (conducting), e_p − v rising through 0 (blocking);
      // written as sign·(f − level) turning non-negative, the level a hair beyond 0 (WATCH_FLOOR).
      const w = conducting ? O_I : O_G;
      const sign = conducting ? -1 : 1;
      const eventLevel = conducting ? -WATCH_FLOOR * scales.current : WATCH_FLOOR * scales.voltage;

      const bracketCurrent = (ta: number, h: number) => {
        const da = va[OUTPUTS + O_I];
        const db = vb[OUTPUTS + O_I];
        if (!(da > 0 && db < 0)) return;
        counters.brackets++;
        const potential = Math.max(va[O_I], vb[O_I]) + 2 * h * Math.max(Math.abs(da), Math.abs(db));
        if (potential < piecePeak) return;
        const s = root(sys.drows[O_I], 0, h, da, db);
        counters.refined++;
        const value = dot(sys.rows[O_I], local.at(s, scratch), N);
        piecePeak = Math.max(piecePeak, value);
        recorder.offerCurrent(value, ta + s, group);
      };

      const bracketVoltage = (o: number, kind: 1 | -1, ta: number, h: number) => {
        const da = va[OUTPUTS + o];
        const db = vb[OUTPUTS + o];
        if (!(kind * da > 0 && kind * db < 0)) return;
        counters.brackets++;
        const edge = kind === 1 ? Math.max(va[o], vb[o]) : Math.min(va[o], vb[o]);
        const potential = edge + kind * 2 * h * Math.max(Math.abs(da), Math.abs(db));
        const picker = o === O_V ? recorder.vMax : kind === 1 ? recorder.vCMax : recorder.vCMin;
        const best = picker.bestValue;
        if (picker.has && kind * potential < kind * best - 1e-9 * Math.abs(best)) return;
        const s = root(sys.drows[o], 0, h, da, db);
        counters.refined++;
        const value = dot(sys.rows[o], local.at(s, scratch), N);
        picker.offer(value, ta + s);
      };

      let loaded = false;
      let step = 0;
      const load = () => {
        if (!loaded) local.load(sys, za, step);
        loaded = true;
      };
      while (a < tEnd) {
        step = level.h;
        let truncated = false;
        let toEnd = false;
        if (a + step >= tEnd - 1e-15 * Math.abs(tEnd)) {
          step = tEnd - a;
          truncated = step !== level.h;
          toEnd = true;
        }
        loaded = false;
        if (truncated) {
          load();
          local.at(step, zb);
        } else {
          stepWith(level.E, za, N, zb);
        }
        outputs(sys, zb, vb);
        counters.intervals++;

        // A piece starts on the holding side (a start value past the level is rounding at its own event).
        const fa = first && sign * (va[w] - eventLevel) >= 0 ? -sign * Number.MIN_VALUE : va[w] - eventLevel;
        const fb = vb[w] - eventLevel;
        let s: number | null = null;
        if (sign * fb >= 0) {
          load();
          s = sign * fa >= 0 ? 0 : root(sys.rows[w], 0, step, fa, fb, eventLevel);
        } else if (sign * va[OUTPUTS + w] > 0 && sign * vb[OUTPUTS + w] < 0) {
          // An excursion toward the event that turns back inside the interval.
          load();
          const turn = root(sys.drows[w], 0, step, va[OUTPUTS + w], vb[OUTPUTS + w]);
          const top = dot(sys.rows[w], local.at(turn, scratch), N) - eventLevel;
          if (sign * top >= 0) s = root(sys.rows[w], 0, turn, fa, top, eventLevel);
        }
        if (s !== null) {
          step = s;
          truncated = true;
          hit = true;
          local.at(step, zb);
          outputs(sys, zb, vb);
          if (conducting) vb[O_I] = 0;
        }
        if (step > 0) {
          if (conducting && va[OUTPUTS + O_I] > 0 && vb[OUTPUTS + O_I] < 0) {
            load();
            bracketCurrent(a, step);
          }
          const dvC = va[OUTPUTS + O_VC] * vb[OUTPUTS + O_VC];
          if (dvC < 0) {
            load();
            bracketVoltage(O_VC, va[OUTPUTS + O_VC] > 0 ? 1 : -1, a, step);
          }
          if (va[OUTPUTS + O_V] > 0 && vb[OUTPUTS + O_V] < 0) {
            load();
            bracketVoltage(O_V, 1, a, step);
          }
          if (conducting) {
            let sum = 0;
            if (truncated) {
              load();
              for (let j = 0; j < GAUSS.fractions.length; j++) {
                const i = dot(sys.rows[O_I], local.at(step * GAUSS.fractions[j], scratch), N);
                sum += GAUSS.weights[j] * i * i;
              }
            } else {
              for (let j = 0; j < level.iNodes.length; j++) {
                const i = dot(level.iNodes[j], za, N);
                sum += GAUSS.weights[j] * i * i;
              }
            }
            pieceI2 += sum * step;
          }
        }
        const tb = toEnd && !hit ? tEnd : a + step;
        if (conducting) {
          recorder.offerCurrent(vb[O_I], tb, group);
          piecePeak = Math.max(piecePeak, vb[O_I]);
        }
        recorder.offerVoltages(vb[O_VC], vb[O_V], tb);
        a = tb;
        const swap = za;
        za = zb;
        zb = swap;
        const swapValues = va;
        va = vb;
        vb = swapValues;
        first = false;
        if (hit) break;
        if (!truncated && a - t0 >= 8 * level.h && 2 * level.h <= sys.cap) level = levelOf(sys, ++k);
      }

      const rLimiter = config.limiterIn ? model.rLimiterStart : 0;
      recorder.pieces.push({
        t0,
        t1: a,
        conducting,
        pair: config.pair,
        group,
        i2t: pieceI2,
        limiterEnergy: rLimiter * pieceI2,
        peakCurrent: piecePeak,
      });
      stored.push({ sys, t0, t1: a, z0: zStart });
      return { t: a, state: fromBalanced(sys, za), hit };
    },
  };

  const initial = augment(model, 0, 0, model.initial.capacitorVoltage, model.initial.dampingVoltage);
  const result = drive(model, recorder, solver, initial);
  const sample = (times: number[]): SampleRow[] => sampleStored(model, stored, times, propagate, expm1);
  if (!result.ok) return { ok: false, failure: result.failure, raw: null, counters, sample };
  const final = result.state;
  const limited = recorder.iMax.limited;
  const limiterPeakPower =
    model.limiter.kind !== 'none' && limited.has
      ? { value: model.rLimiterStart * limited.result().value ** 2, time: limited.result().time }
      : null;
  const raw = rawOf(recorder, {
    finalCapacitorVoltage: final[Z_VC],
    bypassTime: result.bypassTime,
    finalLimiterTemperature: model.limiter.kind === 'ntc' ? model.limiter.startTemperature : null,
    limiterPeakPower,
  });
  return { ok: true, failure: null, raw, counters, sample };
}

/**
 * Waveform rows at sorted times from the stored pieces (each [t0, t1), the last one closed).
 * Consecutive samples of one piece at a repeated spacing step by one cached e^(BΔ) − I, re-anchored
 * from the piece start every 256 samples so that rounding cannot accumulate.
 */
function sampleStored(
  model: MainsModel,
  stored: StoredPiece[],
  times: number[],
  propagate: (sys: PieceSystem, z: Float64Array, s: number) => Float64Array,
  expm1: (B: Matrix, h: number) => Matrix,
): SampleRow[] {
  const rows: SampleRow[] = [];
  const temperature = model.limiter.kind === 'ntc' ? model.limiter.startTemperature : NaN;
  let p = 0;
  let z: Float64Array | null = null;
  let zTime = 0;
  let count = 0;
  for (const t of times) {
    let moved = false;
    while (p < stored.length - 1 && t >= stored[p].t1) {
      p++;
      moved = true;
    }
    const piece = stored[p];
    if (!piece) break;
    const { sys } = piece;
    if (moved) z = null;
    const dt = t - zTime;
    if (z !== null && count % 256 !== 0 && dt > 0) {
      const key = Number(dt.toPrecision(12));
      let E = sys.sampling.get(key);
      if (!E) {
        E = expm1(sys.B, dt);
        if (sys.sampling.size < 8) sys.sampling.set(key, E);
      }
      z = stepWith(E, z, N);
    } else {
      z = propagate(sys, piece.z0, t - piece.t0);
      count = 0;
    }
    zTime = t;
    count++;
    const conducting = sys.config.conducting;
    const i = conducting ? dot(sys.rows[O_I], z, N) : 0;
    const r = sys.config.limiterIn ? model.rLimiterStart : 0;
    rows.push({
      t,
      vC: dot(sys.rows[O_VC], z, N),
      v: dot(sys.rows[O_V], z, N),
      i,
      lineCurrent: conducting ? i * model.bridge.pairs[sys.config.pair].lineSign[0] : 0,
      vSource: rectifiedSource(model.bridge, t),
      limiterPower: r * i * i,
      limiterTemperature: temperature,
      conducting,
      pair: conducting ? sys.config.pair : -1,
    });
  }
  return rows;
}
