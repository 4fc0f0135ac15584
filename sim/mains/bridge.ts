/**
 * The bridge's topology: which diode pair can conduct when, and the source it then connects.
 *
 * Single-phase full bridge, v_s = Vpk·sin(ωt + θ), Vpk = √2·Vrms:
 *   pair 0 = D1 (line, to DC+) and D4 (neutral, from DC−), conducting while the line is positive;
 *   pair 1 = D2 (neutral, to DC+) and D3 (line, from DC−), the negative half-cycles.
 * Three-phase six-pulse bridge, v_ab = Vpk·sin(ωt + θ), Vpk = √2·V_LL, phases a, b, c in that
 * order: the six line-to-line voltages are Vpk·sin(ωt + θ + k·60°), k = 0…5 standing for
 * ab, cb, ca, ba, bc, ac; the conducting pair is the upper diode of the first phase named and the
 * lower diode of the second (the most positive and the most negative phase).
 *
 * Time is cut into sectors in which the candidate pair is fixed: half-cycles of v_s (single-phase),
 * 60° intervals bounded where two line-to-line voltages are equal (three-phase). Sectors are counted
 * by an integer so that a boundary computed in floating point never puts the run back in the sector
 * it just left. The conducting pair connects e_p(t) = Vpk·sin(ωt + θ + φ_p) − 2·Vf to the DC side,
 * two diodes' forward drops in series.
 */
import type { MainsKind, MainsSource } from './schema';

export interface Pair {
  /** Phase offset φ_p of its source, rad. */
  phase: number;
  /** Indices into `Bridge.diodes`. */
  diodes: [number, number];
  /** Sign of the current in line a (single-phase: the line) while this pair conducts: +1, −1 or 0. */
  lineSign: [number, number, number];
  label: string;
}

export interface Bridge {
  kind: MainsKind;
  omega: number;
  /** Switch-on angle, rad, in [0, 2π). */
  theta: number;
  /** Peak of the bridge's source (√2·V), V. */
  peak: number;
  /** Two diodes' forward drops, V. */
  drop: number;
  /** Sector width (rad of ωt) and the angle x = ωt + θ at which sector 0 starts. */
  sectorWidth: number;
  sectorStart: number;
  pairs: Pair[];
  diodes: string[];
  /** Line names, for per-line I²t (single-phase: the one line). */
  lines: string[];
}

const SINGLE_PAIRS: Pair[] = [
  { phase: 0, diodes: [0, 3], lineSign: [1, 0, 0], label: 'D1+D4' },
  { phase: Math.PI, diodes: [1, 2], lineSign: [-1, 0, 0], label: 'D2+D3' },
];

// Upper diodes 0–2 (a+, b+, c+), lower diodes 3–5 (a−, b−, c−).
const LL = ['ab', 'cb', 'ca', 'ba', 'bc', 'ac'];
const THREE_PAIRS: Pair[] = LL.map((name, k) => {
  const upper = name.charCodeAt(0) - 97;
  const lower = name.charCodeAt(1) - 97;
  const lineSign: [number, number, number] = [0, 0, 0];
  lineSign[upper] = 1;
  lineSign[lower] = -1;
  return { phase: (k * Math.PI) / 3, diodes: [upper, 3 + lower], lineSign, label: `D${name[0]}+ D${name[1]}−` };
});

export function bridgeOf(mains: MainsSource): Bridge {
  const three = mains.kind === 'three-phase';
  const turn = 2 * Math.PI;
  const theta = ((((mains.angle * Math.PI) / 180) % turn) + turn) % turn;
  return {
    kind: mains.kind,
    omega: turn * mains.frequency,
    theta,
    peak: Math.SQRT2 * mains.voltage,
    drop: 2 * mains.diode.forwardVoltage,
    sectorWidth: three ? Math.PI / 3 : Math.PI,
    sectorStart: three ? Math.PI / 3 : 0,
    pairs: three ? THREE_PAIRS : SINGLE_PAIRS,
    diodes: three ? ['Da+', 'Db+', 'Dc+', 'Da−', 'Db−', 'Dc−'] : ['D1', 'D2', 'D3', 'D4'],
    lines: three ? ['a', 'b', 'c'] : ['line'],
  };
}

/** The sector containing t (use only at t = 0; afterwards sectors are counted). */
export function sectorAt(bridge: Bridge, t: number): number {
  return Math.floor((bridge.omega * t + bridge.theta - bridge.sectorStart) / bridge.sectorWidth);
}

/** When sector m ends, s. */
export function sectorEnd(bridge: Bridge, m: number): number {
  return (bridge.sectorStart + (m + 1) * bridge.sectorWidth - bridge.theta) / bridge.omega;
}

/** The pair that can conduct in sector m (the largest source there). */
export function candidatePair(bridge: Bridge, m: number): number {
  if (bridge.kind === 'single-phase') return ((m % 2) + 2) % 2;
  return ((-m % 6) + 6) % 6;
}

/** e_p(t) = Vpk·sin(ωt + θ + φ_p) − 2·Vf and its time derivative. */
export function pairSource(bridge: Bridge, pair: number, t: number): { e: number; de: number } {
  const x = bridge.omega * t + bridge.theta + bridge.pairs[pair].phase;
  return { e: bridge.peak * Math.sin(x) - bridge.drop, de: bridge.peak * bridge.omega * Math.cos(x) };
}

/** Coefficients of e_p over [sin ωt, cos ωt, 1]: Vpk·cos(θ+φ), Vpk·sin(θ+φ), −2Vf. */
export function pairSourceCoefficients(bridge: Bridge, pair: number): { sin: number; cos: number; one: number } {
  const a = bridge.theta + bridge.pairs[pair].phase;
  return { sin: bridge.peak * Math.cos(a), cos: bridge.peak * Math.sin(a), one: -bridge.drop };
}

/** The rectified source before the drops: |v_s| (single-phase) or the largest line-to-line voltage. */
export function rectifiedSource(bridge: Bridge, t: number): number {
  let best = -Infinity;
  for (const p of bridge.pairs) best = Math.max(best, bridge.peak * Math.sin(bridge.omega * t + bridge.theta + p.phase));
  return best;
}

/** The pair with the largest source at t (ties to the lower index). */
export function largestPair(bridge: Bridge, t: number): number {
  let best = -Infinity;
  let index = 0;
  bridge.pairs.forEach((p, k) => {
    const value = Math.sin(bridge.omega * t + bridge.theta + p.phase);
    if (value > best) {
      best = value;
      index = k;
    }
  });
  return index;
}
