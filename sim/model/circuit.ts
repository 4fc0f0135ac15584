/**
 * The one circuit model, as equations.
 *
 *  Vs --Rsrc--Lsrc--[Rpre || bypass]--Lf--Rf--+-- bus node v
 *                                             |
 *        ESR–C            Rd–Cd          Rbleed          load
 *
 *   L di/dt     = Vs(t) − Rser·i − v                      (L = Lsrc + Lf)
 *   C dvC/dt    = (v − vC)/ESR                            (ESR > 0)
 *   Cd dvD/dt   = (v − vD)/Rd
 *   i           = iC + (v − vD)/Rd + v/Rbleed + iload(v)  (KCL at the bus node)
 *
 * The bus node has no capacitance of its own, so v is algebraic: with ESR > 0 it solves the node
 * equation (a parallel combination of the branch conductances); with ESR = 0 it is vC itself and
 * the capacitor current is what KCL leaves over. With L = 0 the current is algebraic too,
 * i = (Vs − v)/Rser, and the source joins the node equation as a conductance 1/Rser.
 *
 * Two independent encodings of these equations live here: `linearSystem` builds the state matrix
 * for the exact solver, `evaluate` computes the right-hand side directly for the ODE integrator.
 * A test checks them against each other.
 */
import type { Bypass, Design, Load } from '../design';
import * as layout from './layout';

// Plain locals: module-namespace getters are slow in the hot loops.
const { I, N_AUG, ONE, TIME, VC, VD } = layout;

/** The circuit with its parts resolved to numbers. */
export interface Circuit {
  sourceVoltage: number;
  riseTime: number;
  inductance: number;
  /** Rsrc + Rf: the series resistance with the bypass closed. */
  baseResistance: number;
  prechargeResistance: number | null;
  bypass: Bypass | null;
  capacitance: number;
  esr: number;
  damping: { resistance: number; capacitance: number } | null;
  bleederResistance: number | null;
  load: Load | null;
  initial: [number, number, number];
  duration: number;
}

export function circuitOf(design: Design): Circuit {
  const inductance = design.source.inductance + (design.filter?.inductance ?? 0);
  return {
    sourceVoltage: design.source.voltage,
    riseTime: design.source.riseTime,
    inductance,
    baseResistance: design.source.resistance + (design.filter?.resistance ?? 0),
    prechargeResistance: design.precharge?.resistance ?? null,
    bypass: design.precharge?.bypass ?? null,
    capacitance: design.capacitor.capacitance,
    esr: design.capacitor.esr,
    damping: design.damping,
    bleederResistance: design.bleeder?.resistance ?? null,
    load: design.load,
    // With L = 0 the current is algebraic: an initial inductor current has nowhere to live.
    initial: [
      inductance > 0 ? design.initial.inductorCurrent : 0,
      design.initial.capacitorVoltage,
      design.initial.dampingVoltage,
    ],
    duration: design.duration,
  };
}

/** What is switched during a run. */
export interface Configuration {
  bypassClosed: boolean;
  loadConnected: boolean;
  /** The source is still on its linear rise. */
  ramping: boolean;
}

/** A constant-power load's state: off, drawing P/v, or held at the threshold (see README). */
export type LoadMode = 'off' | 'on' | 'slide';

/** The network for one configuration: every number the equations need. */
export interface Network {
  config: Configuration;
  L: number;
  rSeries: number;
  /** Vs(t) = sourceOffset + sourceSlope·t. */
  sourceOffset: number;
  sourceSlope: number;
  c: number;
  esr: number;
  hasDamping: boolean;
  rd: number;
  cd: number;
  /** Bleeder conductance (0 without one). */
  gBleed: number;
  /** Resistive load conductance while connected. */
  gLoad: number;
  /** Constant load current while connected. */
  iLoad: number;
  /** Constant load power while connected (0 for none). */
  pLoad: number;
  undervoltage: number;
}

export function networkOf(circuit: Circuit, config: Configuration): Network {
  const load = config.loadConnected ? circuit.load : null;
  const ramp = config.ramping && circuit.riseTime > 0;
  return {
    config,
    L: circuit.inductance,
    rSeries:
      circuit.baseResistance + (!config.bypassClosed && circuit.prechargeResistance !== null ? circuit.prechargeResistance : 0),
    sourceOffset: ramp ? 0 : circuit.sourceVoltage,
    sourceSlope: ramp ? circuit.sourceVoltage / circuit.riseTime : 0,
    c: circuit.capacitance,
    esr: circuit.esr,
    hasDamping: circuit.damping !== null,
    rd: circuit.damping?.resistance ?? Infinity,
    cd: circuit.damping?.capacitance ?? 0,
    gBleed: circuit.bleederResistance ? 1 / circuit.bleederResistance : 0,
    gLoad: load?.kind === 'resistance' ? 1 / load.value : 0,
    iLoad: load?.kind === 'current' ? load.value : 0,
    pLoad: load?.kind === 'power' ? load.value : 0,
    undervoltage: circuit.load?.undervoltage ?? 0,
  };
}

export function sourceAt(net: Network, t: number): number {
  return net.sourceOffset + net.sourceSlope * t;
}

/** Whether the network is linear (no constant-power load drawing). */
export function isLinear(net: Network): boolean {
  return net.pLoad === 0;
}

/** Rows over the augmented state z = [i, vC, vD, 1, t]: the state matrix and the outputs. */
export interface LinearSystem {
  /** z' = M·z, row-major N_AUG × N_AUG. */
  M: Float64Array;
  /** Output rows: quantity = row · z. */
  i: Float64Array;
  vC: Float64Array;
  vD: Float64Array;
  v: Float64Array;
  iLoad: Float64Array;
}

function unit(k: number): Float64Array {
  const row = new Float64Array(N_AUG);
  row[k] = 1;
  return row;
}

function combine(terms: [number, Float64Array][]): Float64Array {
  const row = new Float64Array(N_AUG);
  for (const [scale, vector] of terms) {
    if (scale === 0) continue;
    for (let k = 0; k < N_AUG; k++) row[k] += scale * vector[k];
  }
  return row;
}

/** The exact state-space form of a linear network (throws if it has a constant-power load). */
export function linearSystem(net: Network): LinearSystem {
  if (!isLinear(net)) throw new Error('linearSystem: a constant-power load is not linear');
  const eI = unit(I);
  const eVC = unit(VC);
  const eVD = unit(VD);
  const eOne = unit(ONE);
  const source = combine([
    [net.sourceOffset, eOne],
    [net.sourceSlope, unit(TIME)],
  ]);
  const gd = net.hasDamping ? 1 / net.rd : 0;
  const gShunt = net.gBleed + net.gLoad;
  const hasL = net.L > 0;

  // With ESR > 0 the bus sits δ = v − vC above the capacitor: G·δ = K, where K is what flows into
  // the node from everything but the capacitor, evaluated at v = vC. Writing it this way (and not
  // v = J/G with J ∋ vC/ESR) keeps every digit when the ESR is tiny.
  let v: Float64Array;
  let delta: Float64Array | null = null;
  if (net.esr > 0) {
    const g = 1 / net.esr + gd + gShunt + (hasL ? 0 : 1 / net.rSeries);
    const inflow = combine([
      [hasL ? 1 : 0, eI],
      [hasL ? 0 : 1 / net.rSeries, source],
      [hasL ? 0 : -1 / net.rSeries, eVC],
      [gd, eVD],
      [-gd - gShunt, eVC],
      [-net.iLoad, eOne],
    ]);
    delta = combine([[1 / g, inflow]]);
    v = combine([
      [1, eVC],
      [1, delta],
    ]);
  } else {
    v = eVC; // ESR = 0: the capacitor is the bus
  }
  const i = hasL
    ? eI
    : combine([
        [1 / net.rSeries, source],
        [-1 / net.rSeries, v],
      ]);

  const M = new Float64Array(N_AUG * N_AUG);
  const setRow = (k: number, row: Float64Array) => M.set(row, k * N_AUG);
  if (hasL) {
    setRow(
      I,
      combine([
        [1 / net.L, source],
        [-net.rSeries / net.L, eI],
        [-1 / net.L, v],
      ]),
    );
  }
  if (delta) {
    setRow(VC, combine([[1 / (net.esr * net.c), delta]]));
  } else {
    // iC = i − gd (v − vD) − (gb + gl) v − Iload, with v = vC.
    setRow(
      VC,
      combine([
        [1 / net.c, i],
        [-gd / net.c, v],
        [gd / net.c, eVD],
        [-gShunt / net.c, v],
        [-net.iLoad / net.c, eOne],
      ]),
    );
  }
  if (net.hasDamping) {
    setRow(
      VD,
      combine([
        [1 / (net.rd * net.cd), v],
        [-1 / (net.rd * net.cd), eVD],
      ]),
    );
  }
  M[TIME * N_AUG + ONE] = 1;
  const iLoad = combine([
    [net.gLoad, v],
    [net.iLoad, eOne],
  ]);
  return { M, i, vC: eVC, vD: eVD, v, iLoad };
}

/** Everything the ODE path needs at one instant. */
export interface Evaluation {
  v: number;
  i: number;
  iLoad: number;
  /** dy/dt in the state layout. */
  dy: [number, number, number];
  /** dv/dt and di/dt (di/dt of the algebraic current when L = 0). */
  dv: number;
  di: number;
}

/**
 * The right-hand side, written directly from the equations (not through `linearSystem`), with the
 * constant-power load in its current mode:
 *   off   — draws nothing;
 *   on    — draws P/v, v the higher root of the node equation (ESR > 0);
 *   slide — the load sits at its threshold and draws only what keeps v there (the limit of the
 *           on/off chatter that a threshold without hysteresis would produce).
 */
export function evaluate(net: Network, t: number, y: ArrayLike<number>, mode: LoadMode): Evaluation {
  const vs = net.sourceOffset + net.sourceSlope * t;
  const dvs = net.sourceSlope;
  const hasL = net.L > 0;
  const gd = net.hasDamping ? 1 / net.rd : 0;
  const gShunt = net.gBleed + net.gLoad;
  const vC = y[VC];
  const vD = y[VD];
  const power = net.pLoad > 0 ? mode : 'off';
  let v: number;
  let i: number;
  let iPower = 0;
  let dvC: number;
  let dvD: number;
  let dI: number;
  let dv: number;
  let di: number;

  if (net.esr > 0) {
    // δ = v − vC solves G·δ = K (see linearSystem); with the constant-power load on,
    // G·δ² + (G·vC − K)·δ + (P − K·vC) = 0, the root of the higher bus voltage.
    const g = 1 / net.esr + gd + gShunt + (hasL ? 0 : 1 / net.rSeries);
    const k = (hasL ? y[I] : (vs - vC) / net.rSeries) + gd * (vD - vC) - gShunt * vC - net.iLoad;
    let delta: number;
    let root = 0;
    let b = 0;
    if (power === 'on') {
      b = g * vC - k;
      const c = net.pLoad - k * vC;
      root = Math.sqrt(Math.max(b * b - 4 * g * c, 0));
      delta = b > 0 ? (-2 * c) / (b + root) : (-b + root) / (2 * g);
      v = vC + delta;
      iPower = net.pLoad / v;
    } else if (power === 'slide') {
      v = net.undervoltage;
      delta = v - vC;
      iPower = k - g * delta;
    } else {
      delta = k / g;
      v = vC + delta;
    }
    i = hasL ? y[I] : (vs - v) / net.rSeries;
    dI = hasL ? (vs - net.rSeries * i - v) / net.L : 0;
    dvC = delta / (net.esr * net.c);
    dvD = net.hasDamping ? (v - vD) / (net.rd * net.cd) : 0;
    const dk = (hasL ? dI : (dvs - dvC) / net.rSeries) + gd * (dvD - dvC) - gShunt * dvC;
    let dDelta: number;
    if (power === 'on') {
      // Differentiating G·δ² + b·δ + c = 0: δ' = −(b'·δ + c')/(2Gδ + b), and 2Gδ + b = √disc.
      const db = g * dvC - dk;
      const dc = -(dk * vC + k * dvC);
      dDelta = root > 0 ? -(db * delta + dc) / root : 0;
    } else if (power === 'slide') {
      dDelta = -dvC;
    } else {
      dDelta = dk / g;
    }
    dv = dvC + dDelta;
    di = hasL ? dI : (dvs - dv) / net.rSeries;
  } else {
    v = vC;
    i = hasL ? y[I] : (vs - vC) / net.rSeries;
    const rest = i - gd * (v - vD) - gShunt * v - net.iLoad;
    if (power === 'on') iPower = net.pLoad / v;
    else if (power === 'slide') iPower = rest;
    dvC = power === 'slide' ? 0 : (rest - iPower) / net.c;
    dvD = net.hasDamping ? (v - vD) / (net.rd * net.cd) : 0;
    dI = hasL ? (vs - net.rSeries * i - v) / net.L : 0;
    dv = dvC;
    di = hasL ? dI : (dvs - dvC) / net.rSeries;
  }
  return { v, i, iLoad: net.gLoad * v + net.iLoad + iPower, dy: [dI, dvC, dvD], dv, di };
}
