/**
 * One mains sample: the mains engine (sim/mains) at the sample's worst switch-on angle, and the
 * mains rating checks (`mainsChecks`, which maps the rectifier's metrics into the engine's checks).
 *
 * Which angle (README "Mains designs"): corners re-search it for every corner (the angle sweep with
 * its refinement, about 45 runs per corner: a corner is exactly where the worst angle may have
 * moved, and there are at most 1024 of them); Monte Carlo runs every sample at the nominal design's
 * worst angle (one run per sample) and afterwards re-searches the angle for the samples with the
 * largest inrush, reporting how much that changed (summary.ts `mains.angleCheck`).
 */
import { DesignError } from '../errors';
import type { Check, DeratingPolicy } from '../ratings';
import { mainsChecks } from '../mains/checks';
import { limiterResistanceAtStart, loopImpedance, type MainsDesign } from '../mains/schema';
import { simulateMains } from '../mains/simulate';
import { sweepSwitchOnAngle, withAngle } from '../mains/sweep';
import type { MainsSampleMetrics } from './metricList';

/** How a sample's switch-on angle is chosen. Plain data (it is posted to the workers). */
export interface MainsAngleRule {
  /** 'search': each sample's own worst angle; 'fixed': every sample at `angle`. */
  mode: 'search' | 'fixed';
  /** The nominal design's worst angle, degrees. */
  angle: number;
}

/**
 * odex tolerance of the nonlinear mains path (an NTC thermal model, a constant-power load) per
 * sample, as the DC spread uses (evaluate.ts ENGINE_OPTIONS); the exact path does not use it.
 */
export const MAINS_SAMPLE_TOLERANCE = 1e-8;

/** The sweep each search runs: the mains engine's default grid (0–180° in 5° steps) and its refinement to 0.01°. */
export const MAINS_ANGLE_SWEEP = { from: 0, to: 180, step: 5 } as const;

/** The worst switch-on angle of a design (peak inrush current), degrees, and the runs it took. */
export function worstSwitchOnAngle(design: MainsDesign): { angle: number; peakCurrent: number; runs: number } {
  const sweep = sweepSwitchOnAngle(design, { ...MAINS_ANGLE_SWEEP, simulate: { tolerance: MAINS_SAMPLE_TOLERANCE } });
  return { angle: sweep.worst.angle, peakCurrent: sweep.worst.peakCurrent, runs: sweep.runs };
}

/**
 * A sample can reach what the schema refuses in a file: a band down to 0 Ω of line and diode
 * resistance with no inductance and the limiter bypassed leaves nothing to limit the current.
 * Such a sample is invalid (counted and failed), as the schema would say of the file.
 */
function checkLoop(design: MainsDesign): void {
  const limiter = design.mains.limiter;
  const final = limiter.kind === 'none' || limiter.bypass ? 0 : limiterResistanceAtStart(limiter);
  const loop = loopImpedance(design.mains, final);
  if (loop.resistance === 0 && loop.inductance === 0)
    throw new DesignError('zero series impedance with no inductance in this sample: nothing limits the current', 'mains.lineResistance');
}

/** The metrics of one mains design at the angle the rule gives. */
export function mainsSampleMetrics(design: MainsDesign, rule: MainsAngleRule): MainsSampleMetrics {
  checkLoop(design);
  const angle = rule.mode === 'search' ? worstSwitchOnAngle(design).angle : rule.angle;
  const result = simulateMains(withAngle(design, angle), {
    crossCheck: false,
    waveform: false,
    tolerance: MAINS_SAMPLE_TOLERANCE,
  });
  return { ...result.metrics, switchOnAngle: angle };
}

/** Metrics and checks (with their messages) of one mains design. */
export function evaluateMainsDesign(
  design: MainsDesign,
  rule: MainsAngleRule,
  policy: DeratingPolicy,
): { metrics: MainsSampleMetrics; checks: Check[] } {
  const metrics = mainsSampleMetrics(design, rule);
  return { metrics, checks: mainsChecks(design, { metrics }, policy) };
}
