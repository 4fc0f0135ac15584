/**
 * The odex path: the engine's right-hand side (through model.ts `evaluateAt`) integrated piece by
 * piece by odex (Hairer & Wanner's GBS extrapolation code, sim/solvers/odex.ts). It is the only path
 * for the nonlinear cases — an NTC with its thermal model (R falls as it heats), a constant-power
 * load — and the independent cross-check of the exact path on linear designs where an explicit
 * integrator is affordable.
 *
 * State y = [i, vC, vD, T, ∫i² dt, ∫R_lim·i² dt] (the last two restart at each piece), with time and
 * states scaled so that odex's fixed minimum first step and its scalar tolerances fit the circuit.
 * After each accepted step the dense output is sub-sampled (at least 4 points, 16 per fastest
 * oscillation, 1 per degree of the mains); on each sub-interval:
 *  - the bridge's event (i reaching 0 while conducting, e_p − v rising through 0 while blocking)
 *    and the constant-power load's mode exits (sim/model/powerLoad.ts) are located by Brent's method
 *    on the dense output, and the integration restarts there;
 *  - extrema of i, vC, v, the limiter's power and temperature are bracketed by derivative sign
 *    changes and located by maximising the value itself on the dense output (Brent's localmin);
 *    with L = 0 and a heating NTC the current's derivative gets the NTC's share added (see evalAt);
 *  - waveform samples are taken at the requested times.
 */
import type { LoadMode } from '../model/circuit';
import * as powerLoad from '../model/powerLoad';
import * as odexModule from '../solvers/odex';
import * as roots from '../solvers/roots';
import { rectifiedSource } from './bridge';
import { drive, watchScales, WATCH_FLOOR, type PieceSolver, type Probe } from './driver';
import { minimize } from './minimize';
import { DirectEvaluator, networkAt, type Configuration, type DirectEvaluation, type MainsModel } from './model';
import { ntcHeating } from './ntc';
import { Recorder, rawOf, type CurrentGroup, type MainsRaw, type SampleRow } from './record';

// Plain locals: module-namespace getters are slow in the hot loops.
const { createSolver, OdexOutcome } = odexModule;
const { brent } = roots;
const { exitConditions, initialMode, modeAfterExit } = powerLoad;

export interface OdeState {
  i: number;
  vC: number;
  vD: number;
  /** Limiter temperature, K (the start temperature without a thermal model). */
  T: number;
  mode: LoadMode;
  /** Whether the constant-power load has taken its first mode. */
  modeSet: boolean;
}

export interface OdeOptions {
  relativeTolerance: number;
  /** Step budget over the whole run. */
  maxSteps: number;
  /** Sorted times at which to record the waveform. */
  sampleTimes: number[];
  /** Oscillation rate (rad/s) and spectral radius (1/s) of the fastest piece, for the scales. */
  omegaMax: number;
  rho: number;
}

export interface OdeCounters {
  pieces: number;
  steps: number;
  accepted: number;
  rejected: number;
  evaluations: number;
}

export interface OdeRun {
  ok: boolean;
  failure: string | null;
  raw: MainsRaw | null;
  samples: SampleRow[];
  peakRows: SampleRow[];
  counters: OdeCounters;
}

const GUARD = 1e-13;
const SUBSAMPLES_PER_CYCLE = 360;

function groupOf(model: MainsModel, config: Configuration): CurrentGroup {
  return model.limiter.kind === 'none' ? 'plain' : config.limiterIn ? 'limited' : 'bypassed';
}

export function runMainsOde(model: MainsModel, options: OdeOptions): OdeRun {
  const recorder = new Recorder();
  const counters: OdeCounters = { pieces: 0, steps: 0, accepted: 0, rejected: 0, evaluations: 0 };
  const samples: SampleRow[] = [];
  const { bridge } = model;
  const period = (2 * Math.PI) / bridge.omega;
  const T = model.duration;
  const Ts = Math.min(T, options.rho > 0 ? 10 / options.rho : T, period / 4);
  const Vs = bridge.peak;
  const Is = watchScales(model).current;
  const Ks = 100;
  const Rs = Math.max(model.rLimiterStart, 1e-3);
  const S = [Is, Vs, Vs, Ks, Is * Is * Ts, Is * Is * Rs * Ts];
  const solver = createSolver(6);
  solver.denseOutput = true;
  solver.relativeTolerance = options.relativeTolerance;
  solver.absoluteTolerance = options.relativeTolerance;
  solver.initialStepSize = 1e-4;
  const thermal = model.thermal;
  const hasPower = model.load?.kind === 'power' && model.load.value > 0;
  const limiterStart = model.limiter.kind === 'ntc' ? model.limiter.startTemperature : NaN;
  let sampleIndex = 0;
  let failure: string | null = null;
  let lastConfig: Configuration | null = null;
  const direct = new DirectEvaluator(model);
  const evaluateAt = (config: Configuration, t: number, y: ArrayLike<number>, temperature: number, mode: LoadMode) =>
    direct.at(config, t, y, temperature, mode);

  const rowOf = (config: Configuration, t: number, y: ArrayLike<number>, ev: DirectEvaluation): SampleRow => ({
    t,
    vC: y[1],
    v: ev.v,
    i: ev.i,
    lineCurrent: config.conducting ? ev.i * bridge.pairs[config.pair].lineSign[0] : 0,
    vSource: rectifiedSource(bridge, t),
    limiterPower: ev.limiterPower,
    limiterTemperature: model.limiter.kind === 'ntc' ? y[3] : NaN,
    conducting: config.conducting,
    pair: config.conducting ? config.pair : -1,
  });

  const loadWatch = (config: Configuration, t: number, y: ArrayLike<number>, mode: LoadMode): number[] => {
    if (!hasPower || !config.loadConnected) return [];
    return exitConditions(direct.network(config, t, y[3]), 0, [config.conducting ? y[0] : 0, y[1], y[2]], mode);
  };

  const pieceSolver: PieceSolver<OdeState> = {
    failure: null,
    probe(config, t, st): Probe {
      const ev = evaluateAt(config, t, [st.i, st.vC, st.vD], st.T, st.mode);
      return { i: ev.i, di: ev.di, g: ev.g, dg: ev.dg };
    },
    enter(config, _t, st, fromConducting) {
      return { ...st, i: config.conducting && fromConducting ? st.i : 0 };
    },
    run(config, tStart, st0, tEnd) {
      counters.pieces++;
      lastConfig = config;
      const group = groupOf(model, config);
      const conducting = config.conducting;
      let st = { ...st0 };
      let t0 = tStart;
      let pieceI2 = 0;
      let pieceEnergy = 0;
      let piecePeak = 0;
      let hitBridge = false;
      while (true) {
        if (hasPower && config.loadConnected && !st.modeSet) {
          st.mode = initialMode(networkAt(model, config, t0, st.T), 0, [conducting ? st.i : 0, st.vC, st.vD]);
          st.modeSet = true;
        }
        if (!config.loadConnected) st.mode = 'off';
        const mode = st.mode;
        const y0 = [st.i, st.vC, st.vD, st.T];
        // With L = 0 the current is algebraic in R(T): the engine's di/dt and dv/dt hold R fixed, so
        // the heating NTC's share, (∂/∂T)·dT/dt, is added (∂/∂T by a forward difference of 1e−6·T).
        const heatingAlgebraic = thermal !== null && model.L === 0 && conducting && config.limiterIn;
        const evalAt = (t: number, y: ArrayLike<number>) => {
          const ev = evaluateAt(config, t, y, y[3], mode);
          if (heatingAlgebraic && thermal) {
            const dT = ntcHeating(
              ev.limiterPower,
              y[3],
              thermal.heatCapacity,
              thermal.dissipationConstant,
              thermal.ambientTemperature,
            );
            const h = 1e-6 * y[3];
            const warmer = evaluateAt(config, t, y, y[3] + h, mode);
            const dv = ((warmer.v - ev.v) / h) * dT;
            ev.di += ((warmer.i - ev.i) / h) * dT;
            ev.dv += dv;
            ev.dg -= dv;
          }
          return ev;
        };
        const startEval = evalAt(t0, y0);
        const startRow = rowOf(config, t0, y0, startEval);
        recorder.offerCurrent(startEval.i, t0, group, startRow);
        recorder.offerVoltages(y0[1], startEval.v, t0, startRow);
        if (config.limiterIn) recorder.limiterPower.offer(startEval.limiterPower, t0, startRow);
        if (thermal) recorder.temperature.offer(y0[3], t0, startRow);
        piecePeak = Math.max(piecePeak, startEval.i);
        if (t0 === 0) {
          while (sampleIndex < options.sampleTimes.length && options.sampleTimes[sampleIndex] <= 0) {
            samples.push({ ...startRow, t: options.sampleTimes[sampleIndex] });
            sampleIndex++;
          }
        }
        const span = (tEnd - t0) / Ts;
        // The bridge's watch holds while > 0, its zero a hair beyond the event (WATCH_FLOOR, driver.ts).
        const watches = (t: number, y: ArrayLike<number>, ev: DirectEvaluation): number[] => [
          conducting ? ev.i + WATCH_FLOOR * Is : WATCH_FLOOR * Vs - ev.g,
          ...loadWatch(config, t, y, mode),
        ];

        const f = (tau: number, Y: number[]): number[] => {
          const t = t0 + tau * Ts;
          const y = [Y[0] * S[0], Y[1] * S[1], Y[2] * S[2], Y[3] * S[3]];
          const ev = evalAt(t, y);
          const dT = thermal
            ? ntcHeating(
                config.limiterIn ? ev.limiterPower : 0,
                y[3],
                thermal.heatCapacity,
                thermal.dissipationConstant,
                thermal.ambientTemperature,
              )
            : 0;
          return [
            ((conducting && model.L > 0 ? ev.dy[0] : 0) * Ts) / S[0],
            (ev.dy[1] * Ts) / S[1],
            (ev.dy[2] * Ts) / S[2],
            (dT * Ts) / S[3],
            (ev.i * ev.i * Ts) / S[4],
            (ev.limiterPower * Ts) / S[5],
          ];
        };

        let stopTau: number | null = null;
        let stopWhich = -1;
        let stopY: number[] | null = null;
        let q = 0;
        let qL = 0;
        let firstInterval = true;
        const guard = (GUARD * Math.max(T, Math.abs(t0))) / Ts;
        const omegaMax = Math.max(options.omegaMax, bridge.omega);

        const observer = (_n: number, ta: number, tb: number, Y: number[], dense?: (c: number, x: number) => number) => {
          if (!dense || !(tb > ta)) return; // odex reports the initial point as a step of zero width
          const at = (tau: number): number[] => [
            dense(0, tau) * S[0],
            dense(1, tau) * S[1],
            dense(2, tau) * S[2],
            dense(3, tau) * S[3],
          ];
          const width = (tb - ta) * Ts;
          const m = Math.min(
            64,
            Math.max(4, Math.ceil((16 * width * omegaMax) / (2 * Math.PI)), Math.ceil((width * SUBSAMPLES_PER_CYCLE) / period)),
          );
          let prevTau = ta;
          let prevY = at(ta);
          let prevT = t0 + ta * Ts;
          let prevEval = evalAt(prevT, prevY);
          let prevG = watches(prevT, prevY, prevEval);
          if (firstInterval) {
            // The piece starts on the event's own zero: count it as on the holding side.
            prevG[0] = Math.max(prevG[0], Number.MIN_VALUE);
            firstInterval = false;
          }
          for (let k = 1; k <= m; k++) {
            let tau = k === m ? tb : ta + ((tb - ta) * k) / m;
            let y = k === m ? [Y[0] * S[0], Y[1] * S[1], Y[2] * S[2], Y[3] * S[3]] : at(tau);
            let t = t0 + tau * Ts;
            let ev = evalAt(t, y);
            let g = watches(t, y, ev);
            let hit = -1;
            let hitTau = Infinity;
            for (let w = 0; w < g.length; w++) {
              if (prevG[w] > 0 && g[w] <= 0) {
                const gw = (x: number) => {
                  const yx = at(x);
                  const tx = t0 + x * Ts;
                  return watches(tx, yx, evalAt(tx, yx))[w];
                };
                const r = brent(gw, prevTau, tau, prevG[w], g[w]);
                if (w === 0) {
                  // A bridge event counts only where the current falls (or e_p − v rises) through 0:
                  // the dense output's rounding around a piece's starting zero is not one.
                  const yr = at(r);
                  const er = evalAt(t0 + r * Ts, yr);
                  if (conducting ? !(er.di < 0) : !(er.dg > 0)) continue;
                }
                if ((r > guard || w === 0) && r < hitTau) {
                  hitTau = r;
                  hit = w;
                }
              }
            }
            if (hit >= 0) {
              tau = hitTau;
              y = at(tau);
              t = t0 + tau * Ts;
              ev = evalAt(t, y);
              if (hit === 0 && conducting) ev.i = 0;
              g = watches(t, y, ev);
            }
            processInterval(prevTau, tau, prevY, y, prevEval, ev, at);
            if (hit >= 0) {
              stopTau = tau;
              stopWhich = hit;
              stopY = y;
              q = dense(4, tau) * S[4];
              qL = dense(5, tau) * S[5];
              return false;
            }
            prevTau = tau;
            prevY = y;
            prevEval = ev;
            prevG = g;
          }
          return true;
        };

        const processInterval = (
          ta: number,
          tb: number,
          ya: number[],
          yb: number[],
          ea: DirectEvaluation,
          eb: DirectEvaluation,
          at: (tau: number) => number[],
        ) => {
          const tA = t0 + ta * Ts;
          const tB = t0 + tb * Ts;
          const h = tB - tA;
          while (sampleIndex < options.sampleTimes.length && options.sampleTimes[sampleIndex] <= tB) {
            const ts = options.sampleTimes[sampleIndex];
            if (ts >= tA) {
              const y = at((ts - t0) / Ts);
              samples.push(rowOf(config, ts, y, evalAt(ts, y)));
            }
            sampleIndex++;
          }
          const valueAt = (tau: number, pick: (y: number[], ev: DirectEvaluation) => number) => {
            const y = at(tau);
            return pick(y, evalAt(t0 + tau * Ts, y));
          };
          const refine = (kind: 1 | -1, pick: (y: number[], ev: DirectEvaluation) => number) => {
            const found = minimize((tau) => -kind * valueAt(tau, pick), ta, tb, 1e-14 * Math.max(1, Math.abs(tb)));
            const y = at(found.x);
            const time = t0 + found.x * Ts;
            const ev = evalAt(time, y);
            return { time, y, ev, row: rowOf(config, time, y, ev), value: -kind * found.value };
          };
          const slope = (da: number, db: number) => 2 * h * Math.max(Math.abs(da), Math.abs(db));
          if (conducting && ea.di > 0 && eb.di < 0) {
            const potential = Math.max(ea.i, eb.i) + slope(ea.di, eb.di);
            if (potential >= piecePeak) {
              const r = refine(1, (_y, ev) => ev.i);
              piecePeak = Math.max(piecePeak, r.value);
              recorder.offerCurrent(r.value, r.time, group, r.row);
              if (config.limiterIn && !thermal) recorder.limiterPower.offer(r.ev.limiterPower, r.time, r.row);
            }
          }
          const dA = ea.dy[1];
          const dB = eb.dy[1];
          if (dA * dB < 0) {
            const kind: 1 | -1 = dA > 0 ? 1 : -1;
            const picker = kind === 1 ? recorder.vCMax : recorder.vCMin;
            const potential = (kind === 1 ? Math.max(ya[1], yb[1]) : Math.min(ya[1], yb[1])) + kind * slope(dA, dB);
            if (!picker.has || kind * potential >= kind * picker.bestValue - 1e-9 * Math.abs(picker.bestValue)) {
              const r = refine(kind, (y) => y[1]);
              picker.offer(r.value, r.time, r.row);
            }
          }
          if (ea.dv > 0 && eb.dv < 0) {
            const potential = Math.max(ea.v, eb.v) + slope(ea.dv, eb.dv);
            if (!recorder.vMax.has || potential >= recorder.vMax.bestValue - 1e-9 * Math.abs(recorder.vMax.bestValue)) {
              const r = refine(1, (_y, ev) => ev.v);
              recorder.vMax.offer(r.value, r.time, r.row);
            }
          }
          if (thermal && config.limiterIn) {
            const dp = (y: number[], ev: DirectEvaluation) => {
              const dT = ntcHeating(
                ev.limiterPower,
                y[3],
                thermal.heatCapacity,
                thermal.dissipationConstant,
                thermal.ambientTemperature,
              );
              const limiter = model.limiter;
              const beta = limiter.kind === 'ntc' ? limiter.beta : 0;
              const dR = (-beta / (y[3] * y[3])) * ev.rLimiter * dT;
              return dR * ev.i * ev.i + 2 * ev.rLimiter * ev.i * ev.di;
            };
            if (dp(ya, ea) > 0 && dp(yb, eb) < 0) {
              const r = refine(1, (_y, ev) => ev.limiterPower);
              recorder.limiterPower.offer(r.value, r.time, r.row);
            }
            const dTa = ntcHeating(
              ea.limiterPower,
              ya[3],
              thermal.heatCapacity,
              thermal.dissipationConstant,
              thermal.ambientTemperature,
            );
            const dTb = ntcHeating(
              eb.limiterPower,
              yb[3],
              thermal.heatCapacity,
              thermal.dissipationConstant,
              thermal.ambientTemperature,
            );
            if (dTa > 0 && dTb < 0) {
              const r = refine(1, (y) => y[3]);
              recorder.temperature.offer(r.value, r.time, r.row);
            }
          }
          const row = rowOf(config, tB, yb, eb);
          recorder.offerCurrent(eb.i, tB, group, row);
          recorder.offerVoltages(yb[1], eb.v, tB, row);
          if (config.limiterIn) recorder.limiterPower.offer(eb.limiterPower, tB, row);
          if (thermal) recorder.temperature.offer(yb[3], tB, row);
          piecePeak = Math.max(piecePeak, eb.i);
        };

        solver.maxSteps = Math.max(1, options.maxSteps - counters.steps);
        solver.maxStepSize = span;
        const result = solver.solve(f, 0, [y0[0] / S[0], y0[1] / S[1], y0[2] / S[2], y0[3] / S[3], 0, 0], span, observer);
        counters.steps += result.nStep;
        counters.accepted += result.nAccept;
        counters.rejected += result.nReject;
        counters.evaluations += result.nEval;
        if (result.outcome === OdexOutcome.MaxStepsExceeded) {
          failure = 'the circuit is too stiff for odex within the step budget';
          pieceSolver.failure = failure;
          return null;
        }
        if (stopTau !== null && stopY !== null) {
          const tStop = t0 + stopTau * Ts;
          pieceI2 += q;
          pieceEnergy += qL;
          const y: number[] = stopY;
          st = { ...st, i: conducting ? y[0] : 0, vC: y[1], vD: y[2], T: y[3] };
          if (stopWhich === 0) {
            hitBridge = true;
            t0 = tStop;
            break;
          }
          st.mode = modeAfterExit(
            networkAt(model, config, tStop, st.T),
            0,
            [conducting ? st.i : 0, st.vC, st.vD],
            mode,
            stopWhich - 1,
          );
          recorder.event(tStop, 'load-mode', conducting ? bridge.pairs[config.pair].label : null);
          t0 = tStop;
          if (tStop >= tEnd) break;
          continue;
        }
        pieceI2 += result.y[4] * S[4];
        pieceEnergy += result.y[5] * S[5];
        st = {
          ...st,
          i: conducting ? result.y[0] * S[0] : 0,
          vC: result.y[1] * S[1],
          vD: result.y[2] * S[2],
          T: result.y[3] * S[3],
        };
        t0 = tEnd;
        break;
      }
      recorder.pieces.push({
        t0: tStart,
        t1: t0,
        conducting,
        pair: config.pair,
        group,
        i2t: pieceI2,
        limiterEnergy: pieceEnergy,
        peakCurrent: piecePeak,
      });
      return { t: t0, state: st, hit: hitBridge };
    },
  };

  const initial: OdeState = {
    i: 0,
    vC: model.initial.capacitorVoltage,
    vD: model.initial.dampingVoltage,
    T: Number.isFinite(limiterStart) ? limiterStart : 0,
    mode: 'off',
    modeSet: false,
  };
  const result = drive(model, recorder, pieceSolver, initial);
  if (!result.ok) {
    return { ok: false, failure: failure ?? result.failure, raw: null, samples, peakRows: [], counters };
  }
  const st = result.state;
  // Samples at the very end that the last step did not reach.
  while (sampleIndex < options.sampleTimes.length) {
    const t = options.sampleTimes[sampleIndex++];
    const config: Configuration = lastConfig ?? {
      conducting: false,
      pair: 0,
      limiterIn: model.limiter.kind !== 'none',
      loadConnected: false,
    };
    const y = [st.i, st.vC, st.vD, st.T];
    samples.push(rowOf(config, t, y, evaluateAt(config, t, y, st.T, st.mode)));
  }
  const raw = rawOf(recorder, {
    finalCapacitorVoltage: st.vC,
    bypassTime: result.bypassTime,
    finalLimiterTemperature: model.limiter.kind === 'ntc' ? st.T : null,
    limiterPeakPower: model.limiter.kind !== 'none' && recorder.limiterPower.has ? recorder.limiterPower.result() : null,
  });
  return { ok: true, failure: null, raw, samples, peakRows: recorder.peakRows(), counters };
}
