/**
 * Snubber sizing from the ringing of a switch node.
 *
 * Two-measurement estimate of the loop's parasitics (derived, REFERENCE §4): the node rings at
 * f1 = 1/(2π√(L·Cpar)) alone and at f2 = 1/(2π√(L·(Cpar + Cadd))) with a known capacitor Cadd
 * added across it. Dividing, (f1/f2)² = (Cpar + Cadd)/Cpar, so
 *   Cpar = Cadd / ((f1/f2)² − 1),   L = 1/((2π·f1)²·Cpar).
 *
 * First RC snubber (common practice, REFERENCE §4): Rs ≈ √(L/Cpar), the loop's characteristic
 * impedance, so the ring is damped near critically; Cs a few times Cpar (3–4 ×) so the resistor,
 * not the switch capacitance, sets the damping. Each switching event charges and discharges Cs
 * through Rs, so the resistor dissipates about Cs·V²·f_sw (½CsV² on each of the two edges).
 */
import { DesignError } from '../errors';

export interface ParasiticsInput {
  /** Ring frequency of the bare node, Hz. */
  f1: number;
  /** Ring frequency with Cadd added, Hz (below f1). */
  f2: number;
  /** The capacitance added for the second measurement, F. */
  addedCapacitance: number;
}

export interface Parasitics {
  /** Capacitance of the node (switch output capacitance and layout), F. */
  cParasitic: number;
  /** Loop (stray) inductance, H. */
  lStray: number;
  /** √(L/Cpar), Ω. */
  characteristicImpedance: number;
}

export function estimateParasitics({ f1, f2, addedCapacitance }: ParasiticsInput): Parasitics {
  if (!(f1 > 0) || !Number.isFinite(f1)) throw new DesignError('must be a frequency above 0 Hz', 'f1');
  if (!(f2 > 0) || !Number.isFinite(f2)) throw new DesignError('must be a frequency above 0 Hz', 'f2');
  if (!(addedCapacitance > 0) || !Number.isFinite(addedCapacitance))
    throw new DesignError('must be greater than 0', 'addedCapacitance');
  if (!(f2 < f1)) {
    throw new DesignError(
      'must be below f1: adding capacitance lowers the ring frequency (check that the two readings are not swapped)',
      'f2',
    );
  }
  const ratio = f1 / f2;
  const cParasitic = addedCapacitance / (ratio * ratio - 1);
  const lStray = 1 / ((2 * Math.PI * f1) ** 2 * cParasitic);
  return { cParasitic, lStray, characteristicImpedance: Math.sqrt(lStray / cParasitic) };
}

export interface SnubberInput {
  lStray: number;
  cParasitic: number;
  /** Voltage the snubber capacitor swings through each edge, V (the bus). */
  busVoltage: number;
  /** Switching frequency, Hz. */
  switchingFrequency: number;
  /** Cs/Cpar, default 4. */
  multiple?: number;
}

export interface SnubberProposal {
  /** Snubber resistance √(L/Cpar), Ω. */
  rs: number;
  /** Snubber capacitance multiple·Cpar, F. */
  cs: number;
  /** Power in the snubber resistor, Cs·V²·f, W. */
  resistorPower: number;
  /** Energy per edge, ½·Cs·V², J (two edges per switching period). */
  energyPerEdge: number;
  multiple: number;
}

export const DEFAULT_SNUBBER_MULTIPLE = 4;

export function proposeSnubber({
  lStray,
  cParasitic,
  busVoltage,
  switchingFrequency,
  multiple = DEFAULT_SNUBBER_MULTIPLE,
}: SnubberInput): SnubberProposal {
  if (!(lStray > 0)) throw new DesignError('must be greater than 0', 'lStray');
  if (!(cParasitic > 0)) throw new DesignError('must be greater than 0', 'cParasitic');
  if (!Number.isFinite(busVoltage)) throw new DesignError('must be a voltage', 'busVoltage');
  if (!(switchingFrequency >= 0) || !Number.isFinite(switchingFrequency))
    throw new DesignError('must be a frequency of 0 Hz or more', 'switchingFrequency');
  if (!(multiple > 0) || !Number.isFinite(multiple)) throw new DesignError('must be greater than 0', 'multiple');
  const rs = Math.sqrt(lStray / cParasitic);
  const cs = multiple * cParasitic;
  return {
    rs,
    cs,
    resistorPower: cs * busVoltage * busVoltage * switchingFrequency,
    energyPerEdge: 0.5 * cs * busVoltage * busVoltage,
    multiple,
  };
}
