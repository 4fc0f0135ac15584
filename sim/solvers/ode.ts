/**
 * The ODE path: odex on the full model, segment by segment. It is the only path for a
 * constant-power load (nonlinear) and the independent cross-check on linear circuits where an
 * explicit integrator is affordable.
 *
 * A segment ends at a known time (source rise, load start, bypass at a time, end of run) or at an
 * event located on odex's dense output by Brent's method to rounding in time: the bypass
 * threshold, or a change of the constant-power load's mode (model/powerLoad.ts). The integration
 * restarts from the state at the event. Extrema come from Brent on the exact right-hand side's
 * derivative evaluated on the dense output; ∫i² dt is integrated as a fourth state.
 *
 * Time and states are scaled (τ = t/Ts, y/scale) so that odex's fixed minimum first step and its
 * scalar tolerances fit every circuit from nanoseconds to seconds.
 */
import type { Design } from '../design';
import { circuitOf, evaluate, networkOf, sourceAt, type Circuit, type LoadMode, type Network } from '../model/circuit';
import * as layout from '../model/layout';
import { exitConditions, initialMode, modeAfterExit } from '../model/powerLoad';
import { configurationAt, fixedBypassTime, nextEventAfter } from '../model/schedule';
import type { RawRun } from '../metrics';
import { Collector, type Group, type PeakRow } from './collector';
import type { Samples, Watch } from './linear';
import { emptySamples, prepareSystem } from './linear';
import { createSolver, OdexOutcome } from './odex';
import { brent } from './roots';

// Plain locals: module-namespace getters are slow in the hot loops.
const { I, VC, VD } = layout;

export interface OdeOptions {
  relativeTolerance: number;
  /** Budget of right-hand-side evaluations over the whole run; beyond it the run stops and says so. */
  maxEvaluations: number;
  settle: Watch | null;
  /** Sorted times at which to record the waveform. */
  sampleTimes: number[];
}

export interface OdeCounters {
  segments: number;
  events: number;
  steps: number;
  accepted: number;
  rejected: number;
  evaluations: number;
}

export interface OdeRun {
  ok: boolean;
  /** Full rows at the picked peaks, to insert into the waveform. */
  peakRows: PeakRow[];
  raw: RawRun | null;
  samples: Samples;
  counters: OdeCounters;
  warnings: string[];
  failure: string | null;
  /** The segments as run, with the load's mode in each. */
  segments: { start: number; end: number; group: Group; mode: LoadMode | null; ramping: boolean; loadConnected: boolean }[];
}

/** Rough cost of an odex run of this circuit, in derivative evaluations (calibrated on the bench). */
export function estimateOdeCost(design: Design): { evaluations: number; stiffness: number } {
  const circuit = circuitOf(design);
  let evaluations = 0;
  let stiffness = 1;
  const bypassTime = fixedBypassTime(circuit);
  const configs = [
    configurationAt(circuit, 0, bypassTime),
    configurationAt(circuit, circuit.duration, circuit.prechargeResistance !== null && circuit.bypass ? 0 : null),
  ];
  for (const config of configs) {
    const net = { ...networkOf(circuit, config), pLoad: 0 };
    const ps = prepareSystem(net);
    let slowest = Infinity;
    let omega = 0;
    for (const e of ps.eigenvalues) {
      const magnitude = Math.hypot(e.re, e.im);
      if (magnitude > 0) slowest = Math.min(slowest, magnitude);
      omega = Math.max(omega, Math.abs(e.im));
    }
    if (Number.isFinite(slowest) && slowest > 0) stiffness = Math.max(stiffness, ps.rho / slowest);
    // Stability-bound steps (≈ 3 evaluations per unit of ρ·t measured) plus accuracy-bound ones
    // (≈ 300 per oscillation period at the tolerances used).
    const perSecond = 3 * ps.rho + (300 * omega) / (2 * Math.PI);
    evaluations = Math.max(evaluations, perSecond * circuit.duration);
  }
  return { evaluations: evaluations + 500, stiffness };
}

interface Scales {
  time: number;
  current: number;
  voltage: number;
  charge: number;
}

function scalesOf(circuit: Circuit): Scales {
  const net = networkOf(circuit, configurationAt(circuit, 0, null));
  const ps = prepareSystem({ ...net, pLoad: 0 });
  const voltage =
    Math.max(
      Math.abs(circuit.sourceVoltage),
      Math.abs(circuit.initial[VC]),
      Math.abs(circuit.initial[VD]),
      circuit.load?.kind === 'power' ? circuit.load.undervoltage : 0,
    ) || 1;
  const impedance = circuit.inductance > 0 ? Math.sqrt(circuit.inductance / circuit.capacitance) : net.rSeries + circuit.esr;
  const loadCurrent =
    circuit.load?.kind === 'power'
      ? circuit.load.value / circuit.load.undervoltage
      : circuit.load?.kind === 'current'
        ? Math.abs(circuit.load.value)
        : 0;
  const current = Math.max(Math.abs(circuit.initial[I]), voltage / (impedance || 1), loadCurrent) || 1;
  // odex's first step is at least 1e−4 in its own time unit: make that a small fraction of the fastest scale.
  const time = Math.min(circuit.duration, ps.rho > 0 ? 10 / ps.rho : circuit.duration);
  return { time, current, voltage, charge: current * current * time };
}

const GUARD = 1e-13;

/** Thrown from inside the derivative to stop odex when the evaluation budget is spent. */
class BudgetSpent extends Error {}

export function runOde(design: Design, options: OdeOptions): OdeRun {
  const circuit = circuitOf(design);
  const T = circuit.duration;
  const sc = scalesOf(circuit);
  const S = [sc.current, sc.voltage, sc.voltage, sc.charge];
  const solver = createSolver(4);
  solver.denseOutput = true;
  solver.relativeTolerance = options.relativeTolerance;
  solver.absoluteTolerance = options.relativeTolerance;
  solver.initialStepSize = 1e-4;
  // Re-integrates the step that holds an event up to the event time: the restart state then has
  // the integrator's step accuracy, not the (lower) accuracy of the dense interpolant.
  const refiner = createSolver(4);
  refiner.relativeTolerance = options.relativeTolerance;
  refiner.absoluteTolerance = options.relativeTolerance;

  const collector = new Collector();
  const samples = emptySamples();
  const counters: OdeCounters = { segments: 0, events: 0, steps: 0, accepted: 0, rejected: 0, evaluations: 0 };
  const warnings: string[] = [];
  const segments: OdeRun['segments'] = [];
  const bypass = circuit.prechargeResistance !== null ? circuit.bypass : null;
  const voltageBypass = bypass?.when === 'voltage' ? bypass : null;
  const bypassDirection: 1 | -1 = circuit.sourceVoltage >= 0 ? 1 : -1;
  const bypassThreshold = voltageBypass ? voltageBypass.fraction * circuit.sourceVoltage : 0;
  let bypassTime = fixedBypassTime(circuit);
  let bypassCrossing: number | null = null;
  let residualStep: number | null = null;
  let settleTime: number | null = null;
  let sampleIndex = 0;
  let y = [circuit.initial[0], circuit.initial[1], circuit.initial[2]];
  let t = 0;
  let mode: LoadMode = 'off';
  let wasConnected = false;
  let failure: string | null = null;
  let lastEventTime = -Infinity;
  let spent = 0;
  let burst = 0;

  // Oscillation density for sub-sampling each step (≥ 16 samples per period of the fastest ring).
  const omegaMax = Math.max(
    ...[false, true].map((closed) => {
      const ps = prepareSystem({
        ...networkOf(circuit, {
          ...configurationAt(circuit, 0, null),
          bypassClosed: closed || circuit.prechargeResistance === null,
        }),
        pLoad: 0,
      });
      return Math.max(0, ...ps.oscillations.map((o) => o.omega));
    }),
  );

  const rowOf = (tt: number, state: ArrayLike<number>, v: number, i: number, group: Group): PeakRow => ({
    t: tt,
    vC: state[VC],
    v,
    i,
    vD: state[VD],
    prechargePower: group === 'open' && circuit.prechargeResistance !== null ? circuit.prechargeResistance * i * i : 0,
  });

  const record = (net: Network, tt: number, state: ArrayLike<number>, m: LoadMode, group: Group) => {
    const ev = evaluate(net, tt, state, m);
    const power = group === 'open' && circuit.prechargeResistance !== null ? circuit.prechargeResistance * ev.i * ev.i : 0;
    samples.t.push(tt);
    samples.vC.push(state[VC]);
    samples.v.push(ev.v);
    samples.i.push(ev.i);
    samples.vD.push(state[VD]);
    samples.prechargePower.push(power);
  };

  while (t < T) {
    if (counters.segments > 100_000) {
      failure = 'too many events (the constant-power load switches too often)';
      break;
    }
    const config = configurationAt(circuit, t, bypassTime);
    const net = networkOf(circuit, config);
    const group: Group = circuit.prechargeResistance === null ? 'plain' : config.bypassClosed ? 'after' : 'open';
    const hasPower = net.pLoad > 0;
    if (hasPower && !wasConnected) mode = initialMode(net, t, y);
    wasConnected = config.loadConnected;
    if (!hasPower) mode = 'off';
    if (bypassTime !== null && residualStep === null && t >= bypassTime) residualStep = sourceAt(net, t) - y[VC];
    const watchBypass = voltageBypass !== null && bypassCrossing === null && !config.bypassClosed;
    if (watchBypass && bypassDirection * (y[VC] - bypassThreshold) >= 0) {
      bypassCrossing = t;
      bypassTime = t + voltageBypass.delay;
      continue;
    }
    const tEnd = nextEventAfter(circuit, t, bypassTime);
    const t0 = t;
    const span = (tEnd - t0) / sc.time;
    const startEval = evaluate(net, t0, y, mode);
    collector.offerAll(y[VC], startEval.v, startEval.i, t0, group, rowOf(t0, y, startEval.v, startEval.i, group));
    if (settleTime === null && options.settle && options.settle.direction * (y[VC] - options.settle.threshold) >= 0)
      settleTime = t0;
    if (t0 === 0) {
      while (sampleIndex < options.sampleTimes.length && options.sampleTimes[sampleIndex] <= 0) {
        record(net, options.sampleTimes[sampleIndex], y, mode, group);
        sampleIndex++;
      }
    }

    const f = (tau: number, Y: number[]): number[] => {
      if (++spent > options.maxEvaluations) throw new BudgetSpent();
      const state = [Y[0] * S[0], Y[1] * S[1], Y[2] * S[2]];
      const ev = evaluate(net, t0 + tau * sc.time, state, mode);
      return [
        (ev.dy[0] * sc.time) / S[0],
        (ev.dy[1] * sc.time) / S[1],
        (ev.dy[2] * sc.time) / S[2],
        (ev.i * ev.i * sc.time) / S[3],
      ];
    };
    const watchesStop = (state: ArrayLike<number>, tt: number): number[] => {
      const g: number[] = [];
      g.push(watchBypass ? bypassDirection * (bypassThreshold - state[VC]) : 1);
      if (hasPower) g.push(...exitConditions(net, tt, state, mode));
      return g;
    };

    let stopAt: number | null = null;
    let stopState: number[] | null = null;
    let stopWhich = -1;
    let q = 0;
    let stepStart: { tau: number; Y: number[] } = { tau: 0, Y: [y[0] / S[0], y[1] / S[1], y[2] / S[2], 0] };
    let eventStepStart = stepStart;
    let eventStepEnd = 0;
    let eventSlope = 0;
    const guard = (GUARD * Math.max(T, Math.abs(t0))) / sc.time;

    const observer = (_n: number, ta: number, tb: number, Y: number[], dense?: (c: number, x: number) => number) => {
      if (!dense) return;
      const at = (tau: number): number[] => [dense(0, tau) * S[0], dense(1, tau) * S[1], dense(2, tau) * S[2]];
      const width = (tb - ta) * sc.time;
      const m = Math.min(64, Math.max(4, Math.ceil((16 * width * omegaMax) / (2 * Math.PI))));
      let prevTau = ta;
      let prevState = at(ta);
      let prevEval = evaluate(net, t0 + ta * sc.time, prevState, mode);
      let prevG = watchesStop(prevState, t0 + ta * sc.time);
      for (let k = 1; k <= m; k++) {
        let tau = k === m ? tb : ta + ((tb - ta) * k) / m;
        let state = k === m ? [Y[0] * S[0], Y[1] * S[1], Y[2] * S[2]] : at(tau);
        let g = watchesStop(state, t0 + tau * sc.time);
        let hit = -1;
        let hitTau = Infinity;
        for (let w = 0; w < g.length; w++) {
          if (prevG[w] > 0 && g[w] <= 0) {
            const gw = (x: number) => watchesStop(at(x), t0 + x * sc.time)[w];
            const root = brent(gw, prevTau, tau, prevG[w], g[w]);
            if (root > guard && root < hitTau) {
              hitTau = root;
              hit = w;
            }
          }
        }
        if (hit >= 0) {
          tau = hitTau;
          state = at(tau);
          g = watchesStop(state, t0 + tau * sc.time);
        }
        const ev = evaluate(net, t0 + tau * sc.time, state, mode);
        processInterval(prevTau, tau, prevState, state, prevEval, ev, at);
        if (hit >= 0) {
          stopAt = tau;
          stopState = state;
          stopWhich = hit;
          q = dense(3, tau) * S[3];
          eventStepStart = stepStart;
          eventStepEnd = tb;
          // Slope of the event function, for the Newton polish after the step is re-integrated.
          const delta = 1e-6 * (tb - ta);
          const lo = Math.max(ta, tau - delta);
          const hi = Math.min(tb, tau + delta);
          const gw = (x: number) => watchesStop(at(x), t0 + x * sc.time)[hit];
          eventSlope = hi > lo ? (gw(hi) - gw(lo)) / (hi - lo) : 0;
          return false;
        }
        prevTau = tau;
        prevState = state;
        prevEval = ev;
        prevG = g;
      }
      stepStart = { tau: tb, Y: Y.slice() };
      return true;
    };

    const processInterval = (
      ta: number,
      tb: number,
      ya: number[],
      yb: number[],
      ea: ReturnType<typeof evaluate>,
      eb: ReturnType<typeof evaluate>,
      at: (tau: number) => number[],
    ) => {
      const tA = t0 + ta * sc.time;
      const tB = t0 + tb * sc.time;
      const h = tB - tA;
      // Waveform samples inside (tA, tB].
      while (sampleIndex < options.sampleTimes.length && options.sampleTimes[sampleIndex] <= tB) {
        const ts = options.sampleTimes[sampleIndex];
        if (ts >= tA) record(net, ts, at((ts - t0) / sc.time), mode, group);
        sampleIndex++;
      }
      // Extremum brackets: vC (via dvC), v (dv), i (di).
      const outputs: [number, number, number, number, 'vC' | 'v' | 'i'][] = [
        [ya[VC], yb[VC], ea.dy[1], eb.dy[1], 'vC'],
        [ea.v, eb.v, ea.dv, eb.dv, 'v'],
        [ea.i, eb.i, ea.di, eb.di, 'i'],
      ];
      for (const [va, vb, da, db, name] of outputs) {
        if (!((da > 0 && db < 0) || (da < 0 && db > 0))) continue;
        // A flat stretch (the derivative is rounding noise): the samples already hold its value.
        const level = name === 'i' ? sc.current : sc.voltage;
        if (Math.max(Math.abs(da), Math.abs(db)) * h <= 1e-13 * Math.max(Math.abs(va), Math.abs(vb), level)) continue;
        const kind = da > 0 ? 1 : -1;
        if (name === 'v' && kind === -1) continue;
        const potential =
          (kind === 1 ? Math.max(va, vb) : Math.min(va, vb)) + kind * 2 * h * Math.max(Math.abs(da), Math.abs(db));
        const pickers =
          name === 'vC'
            ? [kind === 1 ? collector.vCMax : collector.vCMin]
            : name === 'v'
              ? [collector.vMax]
              : kind === 1
                ? [collector.iMax.all, ...(group !== 'plain' ? [collector.iMax[group]] : [])]
                : [collector.iMin.all, ...(group !== 'plain' ? [collector.iMin[group]] : [])];
        const useful = pickers.some(
          (p) =>
            !p.has ||
            (kind === 1
              ? potential >= p.bestValue - 1e-9 * Math.abs(p.bestValue)
              : potential <= p.bestValue + 1e-9 * Math.abs(p.bestValue)),
        );
        if (!useful) continue;
        const derivativeAt = (tau: number) => {
          const ev = evaluate(net, t0 + tau * sc.time, at(tau), mode);
          return name === 'vC' ? ev.dy[1] : name === 'v' ? ev.dv : ev.di;
        };
        const tau = brent(derivativeAt, ta, tb, da, db);
        const state = at(tau);
        const ev = evaluate(net, t0 + tau * sc.time, state, mode);
        const time = t0 + tau * sc.time;
        const row = rowOf(time, state, ev.v, ev.i, group);
        if (name === 'vC') collector.offerVC(state[VC], time, row);
        else if (name === 'v') collector.offerV(ev.v, time, row);
        else collector.offerI(ev.i, time, group, row);
      }
      if (settleTime === null && options.settle) {
        const w = options.settle;
        const ga = w.direction * (ya[VC] - w.threshold);
        const gb = w.direction * (yb[VC] - w.threshold);
        if (ga < 0 && gb >= 0) {
          const tau = brent((x) => w.direction * (at(x)[VC] - w.threshold), ta, tb, ga, gb);
          settleTime = t0 + tau * sc.time;
        }
      }
      collector.offerAll(yb[VC], eb.v, eb.i, tB, group, rowOf(tB, yb, eb.v, eb.i, group));
    };

    solver.maxSteps = 1e9; // bounded by the evaluation budget instead
    solver.maxStepSize = span;
    let result: ReturnType<typeof solver.solve>;
    try {
      result = solver.solve(f, 0, [y[0] / S[0], y[1] / S[1], y[2] / S[2], 0], span, observer);
    } catch (error) {
      if (!(error instanceof BudgetSpent)) throw error;
      counters.evaluations = spent;
      failure = `too stiff for the nonlinear solver within the step budget (${options.maxEvaluations} evaluations)`;
      break;
    }
    counters.segments++;
    counters.steps += result.nStep;
    counters.accepted += result.nAccept;
    counters.rejected += result.nReject;
    counters.evaluations += result.nEval;
    if (result.outcome === OdexOutcome.MaxStepsExceeded) {
      failure = 'too stiff for the nonlinear solver within the step budget';
      break;
    }
    if (!result.y.every(Number.isFinite)) {
      failure = 'the integration left the range of finite numbers';
      break;
    }
    const segmentMode = hasPower ? mode : null;
    if (stopAt !== null && stopState !== null) {
      // The dense output places the event to its own accuracy; polish it: re-integrate the step
      // up to the event (step accuracy) and take Newton steps on the event function there.
      let tauStop: number = stopAt;
      let state: number[] = stopState;
      let spentOut = false;
      for (let polish = 0; polish < 4 && tauStop > eventStepStart.tau; polish++) {
        let exact: ReturnType<typeof refiner.solve>;
        try {
          exact = refiner.solve(f, eventStepStart.tau, eventStepStart.Y, tauStop);
        } catch (error) {
          if (!(error instanceof BudgetSpent)) throw error;
          spentOut = true;
          break;
        }
        counters.evaluations += exact.nEval;
        if (!exact.y.every(Number.isFinite)) break;
        state = [exact.y[0] * S[0], exact.y[1] * S[1], exact.y[2] * S[2]];
        q = exact.y[3] * S[3];
        const g = watchesStop(state, t0 + tauStop * sc.time)[stopWhich];
        if (g === 0 || eventSlope === 0) break;
        const next = Math.min(eventStepEnd, Math.max(eventStepStart.tau, tauStop - g / eventSlope));
        if (Math.abs(next - tauStop) <= 4e-16 * Math.abs(tauStop)) break;
        tauStop = next;
      }
      if (spentOut) {
        failure = `too stiff for the nonlinear solver within the step budget (${options.maxEvaluations} evaluations)`;
        break;
      }
      const tStop: number = t0 + tauStop * sc.time;
      segments.push({
        start: t0,
        end: tStop,
        group,
        mode: segmentMode,
        ramping: config.ramping,
        loadConnected: config.loadConnected,
      });
      collector.i2[group] += q;
      counters.events++;
      if (tStop - lastEventTime < 1e-9 * T) burst++;
      else burst = 0;
      lastEventTime = tStop;
      if (burst > 50) {
        failure = 'the constant-power load chatters at its undervoltage threshold';
        break;
      }
      if (stopWhich === 0) {
        bypassCrossing = tStop;
        bypassTime = tStop + (voltageBypass?.delay ?? 0);
      } else {
        mode = modeAfterExit(net, tStop, state, mode, stopWhich - 1);
      }
      t = tStop;
      y = state;
    } else {
      segments.push({
        start: t0,
        end: tEnd,
        group,
        mode: segmentMode,
        ramping: config.ramping,
        loadConnected: config.loadConnected,
      });
      collector.i2[group] += result.y[3] * S[3];
      y = [result.y[0] * S[0], result.y[1] * S[1], result.y[2] * S[2]];
      t = tEnd;
    }
  }
  if (failure) {
    return { ok: false, peakRows: [], raw: null, samples, counters, warnings, failure, segments };
  }
  // Samples at the very end (t = T) that the last step's interior loop did not reach.
  const lastConfig = configurationAt(circuit, T, bypassTime);
  const lastNet = networkOf(circuit, lastConfig);
  const lastGroup: Group = circuit.prechargeResistance === null ? 'plain' : lastConfig.bypassClosed ? 'after' : 'open';
  while (sampleIndex < options.sampleTimes.length) {
    record(lastNet, options.sampleTimes[sampleIndex], y, mode, lastGroup);
    sampleIndex++;
  }
  const closedInRun = bypassTime !== null && bypassTime <= T;
  if (closedInRun && bypassTime === T) {
    const ev = evaluate(lastNet, T, y, mode);
    collector.offerI(ev.i, T, 'after', rowOf(T, y, ev.v, ev.i, 'after'));
    if (residualStep === null) residualStep = sourceAt(lastNet, T) - y[VC];
  }
  const raw = collector.toRaw({
    bypassCrossingTime: bypassCrossing,
    bypassTime: closedInRun ? bypassTime : null,
    residualStep: closedInRun ? residualStep : null,
    finalCapacitorVoltage: y[VC],
    settleTime,
  });
  if (mode === 'slide') {
    warnings.push(
      'at the end of the run the constant-power load is held at its undervoltage threshold: the source cannot lift the bus through the load there (the load starts too early or draws too much)',
    );
  }
  return { ok: true, peakRows: collector.peakRows(), raw, samples, counters, warnings, failure: null, segments };
}
