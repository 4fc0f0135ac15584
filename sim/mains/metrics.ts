/**
 * Mains metrics from a run: the engine's DC-side names where they apply (so that the ratings
 * checks read them as they are), and the rectifier's own.
 *
 *  - i2t: what a fuse in the line sees, ∫i_line² dt. Single-phase: the line carries every pulse.
 *    Three-phase: each line carries the current while its phase is in the conducting pair; i2t is
 *    the worst line's.
 *  - Per diode: each diode carries the DC current while its pair conducts (single-phase: one pair
 *    per half-cycle; three-phase: each diode for 120° in two 60° pairs). Its I²t is summed over the
 *    run; a pulse is one contiguous conduction of that diode.
 *  - Half-sine-equivalent surge current, to compare with IFSM: the peak of the one half-sine of
 *    duration t_half (10 ms at 50 Hz, 8.3 ms at 60 Hz, the IFSM test pulse) that has the same I²t as
 *    the worst single diode pulse, I_eq = √(2·I²t/t_half), since a half-sine of peak I over t_half
 *    has I²t = I²·t_half/2 (REFERENCE §5 [der]). For a pulse shorter than t_half this is the usual
 *    I²t equivalence; the diode's own peak current is reported beside it.
 *  - The limiter: energy ∫R·i² dt and peak power while it carries the current; these are also
 *    given as prechargeEnergy and prechargePeakPower, the keys the precharge-resistor checks read.
 */
import type { Extremum } from '../metrics';
import type { Bridge } from './bridge';
import type { MainsModel } from './model';
import type { MainsRaw, PieceRecord } from './record';
import type { MainsDesign } from './schema';

export interface DiodeMetrics {
  name: string;
  /** ∫i² dt over the whole run, A²s. */
  i2t: number;
  /** The largest ∫i² dt of one conduction pulse of this diode, A²s. */
  pulseI2t: number;
  /** Largest current it carries, A. */
  peakCurrent: number;
  pulses: number;
}

export interface MainsMetrics {
  /** Peak inrush: the largest line (= DC) current, and when. */
  peakCurrent: Extremum;
  /** I²t the line fuse sees (the worst line's), A²s. */
  i2t: number;
  /** Per line (single-phase: the one line), A²s. */
  lineI2t: { line: string; i2t: number }[];
  /** ∫i² dt of the DC-side current (three-phase: more than any one line's), A²s. */
  dcI2t: number;
  diodes: DiodeMetrics[];
  /** The largest whole-run I²t of one diode, A²s. */
  diodeI2t: number;
  /** The largest I²t of one conduction pulse of one diode, A²s. */
  diodePulseI2t: number;
  /** √(2·diodePulseI2t/surgePulseDuration): the half-sine with the same I²t, to compare with IFSM, A. */
  surgeEquivalentCurrent: number;
  /** t_half of that half-sine, s. */
  surgePulseDuration: number;
  /** Energy the limiter absorbs while it carries the current, J (0 without a limiter). */
  limiterEnergy: number;
  /** Peak R_lim·i², W, and when; null without a limiter (or if it never carries current). */
  limiterPeakPower: Extremum | null;
  /** The same energy and peak power under the precharge-resistor keys the ratings checks read. */
  prechargeEnergy: number;
  prechargePeakPower: number;
  /** Limiter resistance at switch-on, Ω (null without a limiter). */
  limiterStartResistance: number | null;
  /** NTC with a thermal model: its hottest point and final temperature, K (null otherwise; without a thermal model the final is the start temperature). */
  peakLimiterTemperature: Extremum | null;
  finalLimiterTemperature: number | null;
  peakCapacitorVoltage: Extremum;
  minCapacitorVoltage: Extremum;
  peakBusVoltage: Extremum;
  finalCapacitorVoltage: number;
  /** The no-load DC level: √2·V − 2·Vf (what the capacitor charges to with no load). */
  steadyStateVoltage: number;
  /** ½·C·(peak vC)². */
  storedEnergyAtPeak: number;
  /** When the relay shorted the limiter, null if it did not within the run (or there is none). */
  bypassTime: number | null;
  peakCurrentAfterBypass: number | null;
  i2tAfterBypass: number | null;
  /** Over the last full mains cycle of the run (null if the run is shorter than a cycle): the
   *  limiter's average power, W, and the RMS current of the worst line, A. */
  limiterContinuousPower: number | null;
  lineRmsCurrent: number | null;
  /** Not defined for the mains case (kept for the checks' metric shape). */
  residualStep: null;
  conductionPulses: number;
}

function diodeMetrics(bridge: Bridge, pieces: PieceRecord[]): DiodeMetrics[] {
  const out = bridge.diodes.map((name) => ({ name, i2t: 0, pulseI2t: 0, peakCurrent: 0, pulses: 0 }));
  const open = bridge.diodes.map(() => ({ end: -Infinity, i2t: 0 }));
  for (const piece of pieces) {
    if (!piece.conducting) continue;
    for (const d of bridge.pairs[piece.pair].diodes) {
      const m = out[d];
      m.i2t += piece.i2t;
      m.peakCurrent = Math.max(m.peakCurrent, piece.peakCurrent);
      const pulse = open[d];
      if (pulse.end === piece.t0) {
        pulse.i2t += piece.i2t;
      } else {
        pulse.i2t = piece.i2t;
        m.pulses++;
      }
      pulse.end = piece.t1;
      m.pulseI2t = Math.max(m.pulseI2t, pulse.i2t);
    }
  }
  return out;
}

export function assembleMainsMetrics(design: MainsDesign, model: MainsModel, raw: MainsRaw): MainsMetrics {
  const { bridge } = model;
  const pieces = raw.pieces;
  let dcI2t = 0;
  let limiterEnergy = 0;
  let afterBypass = 0;
  let pulses = 0;
  let previousEnd = -Infinity;
  const lineI2t = bridge.lines.map((line) => ({ line, i2t: 0 }));
  for (const piece of pieces) {
    if (!piece.conducting) continue;
    dcI2t += piece.i2t;
    limiterEnergy += piece.limiterEnergy;
    if (piece.group === 'bypassed') afterBypass += piece.i2t;
    bridge.pairs[piece.pair].lineSign.forEach((sign, l) => {
      if (sign !== 0 && l < lineI2t.length) lineI2t[l].i2t += piece.i2t;
    });
    if (piece.t0 !== previousEnd) pulses++;
    previousEnd = piece.t1;
  }
  const diodes = diodeMetrics(bridge, pieces);
  let lastEnergy = 0;
  const lastLine = bridge.lines.map(() => 0);
  if (model.windowStart !== null) {
    for (const piece of pieces) {
      if (!piece.conducting || piece.t0 < model.windowStart) continue;
      lastEnergy += piece.limiterEnergy;
      bridge.pairs[piece.pair].lineSign.forEach((sign, l) => {
        if (sign !== 0 && l < lastLine.length) lastLine[l] += piece.i2t;
      });
    }
  }
  const cycle = (2 * Math.PI) / bridge.omega;
  const diodePulseI2t = Math.max(0, ...diodes.map((d) => d.pulseI2t));
  const tHalf = design.mains.diode.surgePulseDuration;
  const hasLimiter = model.limiter.kind !== 'none';
  return {
    peakCurrent: raw.peakCurrent,
    i2t: Math.max(...lineI2t.map((l) => l.i2t)),
    lineI2t,
    dcI2t,
    diodes,
    diodeI2t: Math.max(0, ...diodes.map((d) => d.i2t)),
    diodePulseI2t,
    surgeEquivalentCurrent: Math.sqrt((2 * diodePulseI2t) / tHalf),
    surgePulseDuration: tHalf,
    limiterEnergy,
    limiterPeakPower: hasLimiter ? raw.limiterPeakPower : null,
    prechargeEnergy: limiterEnergy,
    prechargePeakPower: hasLimiter ? (raw.limiterPeakPower?.value ?? 0) : 0,
    limiterStartResistance: hasLimiter ? model.rLimiterStart : null,
    peakLimiterTemperature: model.thermal ? raw.peakLimiterTemperature : null,
    finalLimiterTemperature: raw.finalLimiterTemperature,
    peakCapacitorVoltage: raw.peakCapacitorVoltage,
    minCapacitorVoltage: raw.minCapacitorVoltage,
    peakBusVoltage: raw.peakBusVoltage,
    finalCapacitorVoltage: raw.finalCapacitorVoltage,
    steadyStateVoltage: bridge.peak - bridge.drop,
    storedEnergyAtPeak: 0.5 * design.capacitor.capacitance * raw.peakCapacitorVoltage.value ** 2,
    bypassTime: raw.bypassTime,
    peakCurrentAfterBypass: raw.peakCurrentAfterBypass ? raw.peakCurrentAfterBypass.value : null,
    i2tAfterBypass: raw.bypassTime === null ? null : afterBypass,
    limiterContinuousPower: model.windowStart === null ? null : hasLimiter ? lastEnergy / cycle : 0,
    lineRmsCurrent: model.windowStart === null ? null : Math.sqrt(Math.max(...lastLine) / cycle),
    residualStep: null,
    conductionPulses: pulses,
  };
}
