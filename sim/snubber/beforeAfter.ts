/**
 * A proposed snubber tried on the turn-off design: the engine runs the design without a snubber
 * (no damping branch) and with the proposal as its damping branch Rd–Cd, and the two are put side by
 * side, waveforms included, for the before/after view.
 */
import type { Design, DesignInput } from '../design';
import type { Metrics } from '../metrics';
import type { DeratingPolicy } from '../ratings';
import { simulate } from '../simulate';
import { toDesignInput } from '../spread/designInput';
import { cloneDesign } from '../spread/paths';
import { DesignError } from '../errors';
import { turnOffSummary, type TurnOffSummary } from './turnOff';

export interface SnubberValues {
  rs: number;
  cs: number;
}

export interface TurnOffRun {
  design: DesignInput;
  metrics: Metrics;
  summary: TurnOffSummary;
  /** Switch (bus node) voltage and loop current against time. */
  waveform: { t: number[]; v: number[]; i: number[] };
  warnings: string[];
}

export interface SnubberComparison {
  before: TurnOffRun;
  after: TurnOffRun;
  peakBefore: number;
  peakAfter: number;
  /** (peakBefore − peakAfter) / (peakBefore − Vs) · 100: how much of the overshoot the snubber removes. */
  overshootReductionPercent: number | null;
  ringFrequencyBefore: number | null;
  ringFrequencyAfter: number | null;
  zetaBefore: number | null;
  zetaAfter: number | null;
  /** The snubber resistor's step at turn-off, Rs·I0 (REFERENCE §4). */
  stepAtTurnOff: number;
}

export interface SnubberComparisonOptions {
  /** Waveform points of each run, default the design's. */
  points?: number;
  policy?: DeratingPolicy;
}

function run(design: Design, options: SnubberComparisonOptions): TurnOffRun {
  const result = simulate(design, { points: options.points });
  return {
    design: toDesignInput(design),
    metrics: result.metrics,
    summary: turnOffSummary(design, result.metrics, options.policy),
    waveform: { t: result.waveform.t, v: result.waveform.v, i: result.waveform.i },
    warnings: result.warnings,
  };
}

export function snubberBeforeAfter(
  design: Design,
  proposal: SnubberValues,
  options: SnubberComparisonOptions = {},
): SnubberComparison {
  if (!(proposal.rs > 0) || !Number.isFinite(proposal.rs)) throw new DesignError('must be greater than 0', 'rs');
  if (!(proposal.cs > 0) || !Number.isFinite(proposal.cs)) throw new DesignError('must be greater than 0', 'cs');
  const bare = cloneDesign(design);
  bare.damping = null;
  const snubbed = cloneDesign(design);
  snubbed.damping = { resistance: proposal.rs, capacitance: proposal.cs };
  // A snubber capacitor across the switch starts at the switch's voltage.
  snubbed.initial.dampingVoltage = design.initial.capacitorVoltage;
  const before = run(bare, options);
  const after = run(snubbed, options);
  const vs = design.source.voltage;
  const peakBefore = before.summary.peakSwitchVoltage.value;
  const peakAfter = after.summary.peakSwitchVoltage.value;
  const overshootBefore = peakBefore - vs;
  return {
    before,
    after,
    peakBefore,
    peakAfter,
    overshootReductionPercent: overshootBefore > 0 ? ((peakBefore - peakAfter) / overshootBefore) * 100 : null,
    ringFrequencyBefore: before.summary.ringFrequency,
    ringFrequencyAfter: after.summary.ringFrequency,
    zetaBefore: before.summary.zeta,
    zetaAfter: after.summary.zeta,
    stepAtTurnOff: proposal.rs * design.initial.inductorCurrent,
  };
}
