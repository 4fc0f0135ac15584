/**
 * The constant-power load's modes and the conditions that end each one.
 *
 * The load draws P/v at or above its undervoltage threshold U and nothing below. Without hysteresis
 * that rule can chatter at v = U; the limit of the chatter (the Filippov solution, A. F. Filippov,
 * "Differential Equations with Discontinuous Righthand Sides", Kluwer 1988, ch. 2) is a third mode,
 * "slide": the bus sits at U and the load draws only what keeps it there, between 0 and P/U.
 *
 * With ESR > 0 the bus node is algebraic: G·(v − vC) = K without the load (G the node's
 * conductance, K the inflow at v = vC), G·v² − (G·vC + K)·v + P = 0 with it. "on" takes the higher
 * root (continuous with the unloaded bus as P → 0); it exists while the discriminant is ≥ 0. With
 * ESR = 0 the bus is vC and the modes switch on vC alone.
 *
 * Every exit condition is written as g > 0 while the mode holds; the ODE path watches g and stops
 * where it reaches 0.
 */
import type { LoadMode, Network } from './circuit';
import * as layout from './layout';

// Plain locals: module-namespace getters are slow in the hot loops.
const { I, VC, VD } = layout;

interface Node {
  g: number;
  /** Inflow at v = vC (see circuit.ts): the unloaded bus is vC + k/g. */
  k: number;
  vC: number;
}

/** G and K of the bus node without the constant-power load (ESR > 0). */
function node(net: Network, t: number, y: ArrayLike<number>): Node {
  const hasL = net.L > 0;
  const vs = net.sourceOffset + net.sourceSlope * t;
  const gd = net.hasDamping ? 1 / net.rd : 0;
  const gShunt = net.gBleed + net.gLoad;
  const g = 1 / net.esr + gd + gShunt + (hasL ? 0 : 1 / net.rSeries);
  const k = (hasL ? y[I] : (vs - y[VC]) / net.rSeries) + gd * (y[VD] - y[VC]) - gShunt * y[VC] - net.iLoad;
  return { g, k, vC: y[VC] };
}

/** The loaded bus voltage (higher root) and the discriminant, normalised; null root when none. */
function loaded(n: Node, p: number): { v: number | null; disc: number } {
  const b = n.g * n.vC - n.k;
  const c = p - n.k * n.vC;
  const disc = b * b - 4 * n.g * c;
  const scale = b * b + Math.abs(4 * n.g * c) || 1;
  if (disc < 0) return { v: null, disc: disc / scale };
  const root = Math.sqrt(disc);
  const delta = b > 0 ? (-2 * c) / (b + root) : (-b + root) / (2 * n.g);
  return { v: n.vC + delta, disc: disc / scale };
}

/** ESR = 0: what the capacitor would receive with the load off, at bus voltage v. */
function spare(net: Network, t: number, y: ArrayLike<number>, v: number): number {
  const vs = net.sourceOffset + net.sourceSlope * t;
  const i = net.L > 0 ? y[I] : (vs - v) / net.rSeries;
  const gd = net.hasDamping ? 1 / net.rd : 0;
  return i - gd * (v - y[VD]) - (net.gBleed + net.gLoad) * v - net.iLoad;
}

/** Exit conditions of the mode, each > 0 while the mode holds. */
export function exitConditions(net: Network, t: number, y: ArrayLike<number>, mode: LoadMode): number[] {
  const p = net.pLoad;
  const u = net.undervoltage;
  if (net.esr > 0) {
    const n = node(net, t, y);
    if (mode === 'off') return [u - (n.vC + n.k / n.g)];
    if (mode === 'on') {
      const { v, disc } = loaded(n, p);
      return [disc, (v ?? n.vC) - u];
    }
    const held = n.k - n.g * (u - n.vC);
    return [held, p / u - held];
  }
  if (mode === 'off') return [u - y[VC]];
  if (mode === 'on') return [y[VC] - u];
  const held = spare(net, t, y, u);
  return [held, p / u - held];
}

/** The mode to enter from `from`, whose exit condition `which` has just reached 0. */
export function modeAfterExit(net: Network, t: number, y: ArrayLike<number>, from: LoadMode, which: number): LoadMode {
  const p = net.pLoad;
  const u = net.undervoltage;
  if (from === 'slide') return which === 0 ? 'off' : 'on';
  if (net.esr > 0) {
    const n = node(net, t, y);
    if (from === 'off') {
      const { v } = loaded(n, p);
      return v !== null && v >= u ? 'on' : 'slide';
    }
    const held = n.k - n.g * (u - n.vC);
    return held >= 0 && held <= p / u ? 'slide' : 'off';
  }
  if (from === 'off') return spare(net, t, y, u) - p / u >= 0 ? 'on' : 'slide';
  return spare(net, t, y, u) > 0 ? 'slide' : 'off';
}

/** The mode when the load connects (or at the start of the run). */
export function initialMode(net: Network, t: number, y: ArrayLike<number>): LoadMode {
  const p = net.pLoad;
  const u = net.undervoltage;
  if (net.esr > 0) {
    const n = node(net, t, y);
    if (n.vC + n.k / n.g < u) return 'off';
    const { v } = loaded(n, p);
    return v !== null && v >= u ? 'on' : 'slide';
  }
  if (y[VC] < u) return 'off';
  if (y[VC] > u) return 'on';
  return modeAfterExit(net, t, y, 'off', 0);
}
