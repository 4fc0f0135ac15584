/**
 * The rectifier circuit as equations, in two independent encodings (as the engine does for the DC
 * circuit, sim/model/circuit.ts):
 *
 *            line R, L        limiter R_lim        2 diodes (2·Vf, 2·Rd)
 *   e_p(t) ───/\/\──⌇⌇⌇──────────/\/\/───────────────▷▷──────── bus node v
 *                                                               │ ESR–C │ Rd–Cd │ Rbleed │ load
 *
 *   conducting (pair p):  L di/dt = e_p(t) − R·i − v,   R = R_loop + R_lim (+ 2·Rd in R_loop)
 *   blocking:             i = 0 (the bridge is open; the DC side runs on its own)
 *   DC side:              as the engine's DC model: C dvC/dt = (v − vC)/ESR, Cd dvD/dt = (v − vD)/Rd,
 *                         v from KCL at the bus node (algebraic)
 *
 * With L = 0 the current is algebraic, i = (e_p − v)/R while conducting.
 *
 * `exactSystem` writes the linear pieces as z' = M·z over z = [i, vC, vD, 1, sin ωt, cos ωt]: the
 * sinusoid is part of the state (sin' = ω·cos, cos' = −ω·sin), so the matrix exponential propagates
 * each piece exactly. `networkAt` hands the same circuit, one instant at a time, to the engine's
 * right-hand side (`evaluate` in sim/model/circuit.ts, which also carries the constant-power load's
 * modes) for the odex path: the source there is e_p(t) as a constant plus slope at that instant.
 * A test checks the two encodings against each other.
 */
import type { Load } from '../design';
import { evaluate, type Evaluation, type LoadMode, type Network } from '../model/circuit';
import { bridgeOf, pairSource, pairSourceCoefficients, type Bridge } from './bridge';
import { ntcResistance } from './ntc';
import { limiterResistanceAtStart, loopImpedance, type Limiter, type MainsDesign, type ThermalModel } from './schema';

/** The exact path's augmented state layout. */
export const Z_I = 0;
export const Z_VC = 1;
export const Z_VD = 2;
export const Z_ONE = 3;
export const Z_SIN = 4;
export const Z_COS = 5;
export const Z_N = 6;

/** The circuit with its parts resolved to numbers. */
export interface MainsModel {
  bridge: Bridge;
  /** Loop inductance, H. */
  L: number;
  /** Loop resistance without the limiter (line, diode slopes), Ω. */
  rLoop: number;
  limiter: Limiter;
  /** Limiter resistance at switch-on, Ω (0 without a limiter). */
  rLimiterStart: number;
  /** When the relay shorts the limiter, s; null if never. */
  bypassTime: number | null;
  thermal: ThermalModel | null;
  c: number;
  esr: number;
  damping: { resistance: number; capacitance: number } | null;
  gBleed: number;
  load: Load | null;
  initial: { capacitorVoltage: number; dampingVoltage: number };
  duration: number;
  /** Start of the last full mains cycle of the run (a piece boundary, for the running averages), or null. */
  windowStart: number | null;
  /** No thermal model and no constant-power load: every piece is linear. */
  linear: boolean;
}

export function modelOf(design: MainsDesign): MainsModel {
  const mains = design.mains;
  const limiter = mains.limiter;
  const loop = loopImpedance(mains, 0);
  const thermal = limiter.kind === 'ntc' ? limiter.thermal : null;
  const powerLoad = design.load?.kind === 'power' && design.load.value > 0;
  return {
    bridge: bridgeOf(mains),
    L: loop.inductance,
    rLoop: loop.resistance,
    limiter,
    rLimiterStart: limiterResistanceAtStart(limiter),
    bypassTime: limiter.kind !== 'none' && limiter.bypass ? limiter.bypass.delay : null,
    thermal,
    c: design.capacitor.capacitance,
    esr: design.capacitor.esr,
    damping: design.damping,
    gBleed: design.bleeder ? 1 / design.bleeder.resistance : 0,
    load: design.load,
    initial: { capacitorVoltage: design.initial.capacitorVoltage, dampingVoltage: design.initial.dampingVoltage },
    duration: design.duration,
    windowStart: design.duration > 1 / mains.frequency ? design.duration - 1 / mains.frequency : null,
    linear: thermal === null && !powerLoad,
  };
}

/** What holds during one piece of the run. */
export interface Configuration {
  conducting: boolean;
  /** The conducting pair, or (blocking) the pair that would conduct next in this sector. */
  pair: number;
  /** The limiter carries the current (present and not yet bypassed). */
  limiterIn: boolean;
  loadConnected: boolean;
}

export function configurationKey(c: Configuration): string {
  return `${c.conducting ? 1 : 0}${c.pair}${c.limiterIn ? 1 : 0}${c.loadConnected ? 1 : 0}`;
}

/** Limiter resistance at temperature T (K); the fixed value for a resistor or an NTC without a thermal model. */
export function limiterResistance(model: MainsModel, temperature: number): number {
  const limiter = model.limiter;
  if (limiter.kind === 'ntc' && model.thermal) return ntcResistance(limiter.r25, limiter.beta, temperature);
  return model.rLimiterStart;
}

// ---------------------------------------------------------------------------------------------
// Exact encoding (linear pieces)

export interface ExactRows {
  /** z' = M·z, row-major Z_N × Z_N. */
  M: Float64Array;
  i: Float64Array;
  vC: Float64Array;
  vD: Float64Array;
  v: Float64Array;
  /** e_p − v: > 0 means the pair would conduct (the event function while blocking). */
  g: Float64Array;
}

function unit(k: number): Float64Array {
  const row = new Float64Array(Z_N);
  row[k] = 1;
  return row;
}

function combine(terms: [number, Float64Array][]): Float64Array {
  const row = new Float64Array(Z_N);
  for (const [scale, vector] of terms) {
    if (scale === 0) continue;
    for (let k = 0; k < Z_N; k++) row[k] += scale * vector[k];
  }
  return row;
}

/** The state-space form of one linear piece (no thermal model, no constant-power load drawing). */
export function exactSystem(model: MainsModel, config: Configuration): ExactRows {
  const { bridge } = model;
  const coefficients = pairSourceCoefficients(bridge, config.pair);
  const e = new Float64Array(Z_N);
  e[Z_SIN] = coefficients.sin;
  e[Z_COS] = coefficients.cos;
  e[Z_ONE] = coefficients.one;
  const R = model.rLoop + (config.limiterIn ? model.rLimiterStart : 0);
  const hasL = model.L > 0;
  const load = config.loadConnected ? model.load : null;
  const gLoad = load?.kind === 'resistance' ? 1 / load.value : 0;
  const iLoad = load?.kind === 'current' ? load.value : 0;
  const gShunt = model.gBleed + gLoad;
  const gd = model.damping ? 1 / model.damping.resistance : 0;
  const eI = unit(Z_I);
  const eVC = unit(Z_VC);
  const eVD = unit(Z_VD);
  const eOne = unit(Z_ONE);
  const feeds = config.conducting; // the source reaches the bus node

  let v: Float64Array;
  let i: Float64Array;
  if (model.esr > 0) {
    // KCL at the bus: (1/ESR + gd + gShunt [+ 1/R]) v = [i | e/R] + vC/ESR + gd·vD − Iload.
    const viaR = feeds && !hasL;
    const G = 1 / model.esr + gd + gShunt + (viaR ? 1 / R : 0);
    v = combine([
      [feeds && hasL ? 1 / G : 0, eI],
      [viaR ? 1 / (R * G) : 0, e],
      [1 / (model.esr * G), eVC],
      [gd / G, eVD],
      [-iLoad / G, eOne],
    ]);
  } else {
    v = eVC; // ESR = 0: the capacitor is the bus
  }
  if (!feeds) i = new Float64Array(Z_N);
  else if (hasL) i = eI;
  else
    i = combine([
      [1 / R, e],
      [-1 / R, v],
    ]);

  const M = new Float64Array(Z_N * Z_N);
  const setRow = (k: number, row: Float64Array) => M.set(row, k * Z_N);
  if (feeds && hasL) {
    setRow(
      Z_I,
      combine([
        [1 / model.L, e],
        [-R / model.L, eI],
        [-1 / model.L, v],
      ]),
    );
  }
  if (model.esr > 0) {
    setRow(
      Z_VC,
      combine([
        [1 / (model.esr * model.c), v],
        [-1 / (model.esr * model.c), eVC],
      ]),
    );
  } else {
    // iC = i − gd·(v − vD) − gShunt·v − Iload, with v = vC.
    setRow(
      Z_VC,
      combine([
        [1 / model.c, i],
        [-(gd + gShunt) / model.c, v],
        [gd / model.c, eVD],
        [-iLoad / model.c, eOne],
      ]),
    );
  }
  if (model.damping) {
    const tau = model.damping.resistance * model.damping.capacitance;
    setRow(
      Z_VD,
      combine([
        [1 / tau, v],
        [-1 / tau, eVD],
      ]),
    );
  }
  M[Z_SIN * Z_N + Z_COS] = bridge.omega;
  M[Z_COS * Z_N + Z_SIN] = -bridge.omega;
  const g = combine([
    [1, e],
    [-1, v],
  ]);
  return { M, i, vC: eVC, vD: eVD, v, g };
}

/** The augmented state at t from the physical one: [i, vC, vD, 1, sin ωt, cos ωt]. */
export function augment(model: MainsModel, t: number, i: number, vC: number, vD: number): Float64Array {
  const x = model.bridge.omega * t;
  return new Float64Array([i, vC, vD, 1, Math.sin(x), Math.cos(x)]);
}

// ---------------------------------------------------------------------------------------------
// Direct encoding (odex path), through the engine's right-hand side

/** The engine's network for this configuration at instant t, with the limiter at temperature T. */
export function networkAt(model: MainsModel, config: Configuration, t: number, temperature: number): Network {
  const net = baseNetwork(model, config);
  return { ...net, ...instant(model, config, t, temperature) };
}

function instant(model: MainsModel, config: Configuration, t: number, temperature: number) {
  const source = config.conducting ? pairSource(model.bridge, config.pair, t) : { e: 0, de: 0 };
  const R = model.rLoop + (config.limiterIn ? limiterResistance(model, temperature) : 0);
  // Blocking: an infinite series resistance takes the source out of the node equation and holds
  // the current at 0 (the current state is then ignored).
  return { sourceOffset: source.e, sourceSlope: source.de, rSeries: config.conducting ? R : Infinity };
}

function baseNetwork(model: MainsModel, config: Configuration): Network {
  const load = config.loadConnected ? model.load : null;
  return {
    config: { bypassClosed: !config.limiterIn, loadConnected: config.loadConnected, ramping: false },
    // Blocking: no inductance, so that the engine's node equation has no current state in it.
    L: config.conducting ? model.L : 0,
    rSeries: Infinity,
    sourceOffset: 0,
    sourceSlope: 0,
    c: model.c,
    esr: model.esr,
    hasDamping: model.damping !== null,
    rd: model.damping?.resistance ?? Infinity,
    cd: model.damping?.capacitance ?? 0,
    gBleed: model.gBleed,
    gLoad: load?.kind === 'resistance' ? 1 / load.value : 0,
    iLoad: load?.kind === 'current' ? load.value : 0,
    pLoad: load?.kind === 'power' ? load.value : 0,
    undervoltage: model.load?.undervoltage ?? 0,
  };
}

export interface DirectEvaluation extends Evaluation {
  /** e_p − v (the blocking event function) and its derivative. */
  g: number;
  dg: number;
  /** Limiter resistance and power now. */
  rLimiter: number;
  limiterPower: number;
}

/**
 * The right-hand side with the engine's `evaluate`, one network per configuration reused and
 * updated at each instant (this is the odex path's inner loop).
 */
export class DirectEvaluator {
  private readonly networks = new Map<string, Network>();

  constructor(private readonly model: MainsModel) {}

  network(config: Configuration, t: number, temperature: number): Network {
    const key = configurationKey(config);
    let net = this.networks.get(key);
    if (!net) {
      net = baseNetwork(this.model, config);
      this.networks.set(key, net);
    }
    const model = this.model;
    const R = model.rLoop + (config.limiterIn ? limiterResistance(model, temperature) : 0);
    if (config.conducting) {
      const x = model.bridge.omega * t + model.bridge.theta + model.bridge.pairs[config.pair].phase;
      net.sourceOffset = model.bridge.peak * Math.sin(x) - model.bridge.drop;
      net.sourceSlope = model.bridge.peak * model.bridge.omega * Math.cos(x);
      net.rSeries = R;
    }
    return net;
  }

  /**
   * The right-hand side at (t, y) with y = [i, vC, vD] (the engine's layout), the limiter at
   * temperature T and the constant-power load in `mode`. The source is evaluated at t and passed as
   * offset and slope at local time 0, so that the engine's `evaluate` sees e_p(t) and de_p/dt.
   */
  at(config: Configuration, t: number, y: ArrayLike<number>, temperature: number, mode: LoadMode): DirectEvaluation {
    const model = this.model;
    const net = this.network(config, t, temperature);
    const ev = evaluate(net, 0, config.conducting ? y : [0, y[1], y[2]], mode) as DirectEvaluation;
    if (!config.conducting) {
      ev.i = 0; // −0 from (0 − v)/∞
      ev.di = 0;
    }
    const x = model.bridge.omega * t + model.bridge.theta + model.bridge.pairs[config.pair].phase;
    const e = model.bridge.peak * Math.sin(x) - model.bridge.drop;
    const de = model.bridge.peak * model.bridge.omega * Math.cos(x);
    const rLimiter = config.limiterIn ? limiterResistance(model, temperature) : 0;
    ev.g = e - ev.v;
    ev.dg = de - ev.dv;
    ev.rLimiter = rLimiter;
    ev.limiterPower = rLimiter * ev.i * ev.i;
    return ev;
  }
}

/** One evaluation without a reusable evaluator (tests, probes). */
export function evaluateAt(
  model: MainsModel,
  config: Configuration,
  t: number,
  y: ArrayLike<number>,
  temperature: number,
  mode: LoadMode,
): DirectEvaluation {
  return new DirectEvaluator(model).at(config, t, y, temperature, mode);
}
