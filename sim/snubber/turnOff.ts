/**
 * Switch turn-off: the switch carrying I0 opens, and I0, held by the commutation loop's stray
 * inductance L, charges the switch's output capacitance C (the design's capacitor, starting at the
 * switch's on-state voltage, usually 0 V) from the DC bus Vs. An RC snubber is the damping branch
 * Rd–Cd across it. The switch sees the bus node voltage v.
 *
 * Undamped (derived, REFERENCE §4): V_pk = Vs + I0·√(L/C) from C at the bus voltage, and
 * Vs + √(Vs² + (I0·Z0)²) from 0 V, ringing at 1/(2π√(LC)); 400 V, 50 A, 20 nH, 1 nF: 623.6 V and
 * 858.3 V at 35.6 MHz. The ring frequency and damping reported here are those of the least-damped
 * oscillatory mode of the whole network (snubber included), from the eigenvalues of its state matrix.
 */
import type { Design } from '../design';
import type { Extremum, Metrics } from '../metrics';
import { evaluateChecks, type Check, type DeratingPolicy } from '../ratings';
import { smallEigenvalues } from '../solvers/roots';
import { linearisedModel } from '../stability/linearised';
import { formatEng } from '../units';

export interface RingMode {
  /** Ring (damped) frequency ωd/2π, Hz. */
  frequency: number;
  /** Damping ratio −Re λ/|λ| of the mode. */
  zeta: number;
  /** Natural frequency |λ|/2π, Hz. */
  naturalFrequency: number;
}

export interface TurnOffSummary {
  /** Peak switch (bus node) voltage and when. */
  peakSwitchVoltage: Extremum;
  busVoltage: number;
  /** Peak − bus, V. */
  overshoot: number;
  /** The least-damped oscillatory mode; null when nothing rings (every mode real). */
  ring: RingMode | null;
  ringFrequency: number | null;
  zeta: number | null;
  /** The switch-voltage check (peak bus voltage against ratings.switchVoltage with its derating). */
  switchCheck: Check | null;
  marginPercent: number | null;
  message: string;
}

/** Conductance a load adds to the small-signal network (a turn-off design normally has none). */
function loadConductance(design: Design): number {
  const load = design.load;
  if (!load) return 0;
  if (load.kind === 'resistance') return 1 / load.value;
  // A constant current adds nothing; a constant-power load is linearised only by the stability
  // analysis (at its operating point), not here.
  return 0;
}

/** The least-damped ringing mode of the design's network (with its snubber, if any). */
export function ringMode(design: Design): RingMode | null {
  const model = linearisedModel(design, loadConductance(design));
  let best: RingMode | null = null;
  for (const e of smallEigenvalues(model.matrix, model.n)) {
    const magnitude = Math.hypot(e.re, e.im);
    if (!(e.im > 1e-9 * magnitude)) continue;
    const mode = { frequency: e.im / (2 * Math.PI), zeta: -e.re / magnitude, naturalFrequency: magnitude / (2 * Math.PI) };
    if (!best || mode.zeta < best.zeta) best = mode;
  }
  return best;
}

export function turnOffSummary(design: Design, metrics: Metrics, policy?: DeratingPolicy): TurnOffSummary {
  const peak = metrics.peakBusVoltage;
  const vs = design.source.voltage;
  const ring = ringMode(design);
  const switchCheck = evaluateChecks(design, metrics, policy).find((c) => c.id === 'switch-voltage') ?? null;
  const ringText = ring
    ? `rings at ${formatEng(ring.frequency, 'Hz')} with ζ = ${Number(ring.zeta.toPrecision(2))}`
    : 'does not ring (every mode is overdamped)';
  const message = `The switch peaks at ${formatEng(peak.value, 'V')}, ${formatEng(peak.value - vs, 'V')} over the ${formatEng(vs, 'V')} bus, and ${ringText}.${switchCheck ? ` ${switchCheck.message}` : ''}`;
  return {
    peakSwitchVoltage: peak,
    busVoltage: vs,
    overshoot: peak.value - vs,
    ring,
    ringFrequency: ring?.frequency ?? null,
    zeta: ring?.zeta ?? null,
    switchCheck,
    marginPercent: switchCheck?.marginPercent ?? null,
    message,
  };
}
