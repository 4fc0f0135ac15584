/**
 * What a mains run records while it goes, shared by the exact and the odex paths so that both apply
 * the same conventions: the peaks (earliest among equal maxima, the engine's PeakPicker), one record
 * per piece of the run (its bridge state, ∫i² dt, the limiter's energy, its peak current), and the
 * bridge's events.
 */
import { EQUAL_PEAK_TOLERANCE, type Extremum } from '../metrics';

/**
 * The engine's peak convention (PeakPicker in sim/metrics.ts): the largest value (the smallest with
 * sign −1); values within EQUAL_PEAK_TOLERANCE of it count as equal and the earliest of them wins,
 * whatever order they arrive in. Written again here because this path offers every grid point of a
 * monotone charge, where PeakPicker's filtering on each new maximum dominated the run time; this one
 * prunes its near-equal list only when it grows.
 */
export class PeakPicker<P = unknown> {
  private best = -Infinity;
  private near: { value: number; time: number; payload?: P }[] = [];

  constructor(private readonly sign: 1 | -1 = 1) {}

  offer(value: number, time: number, payload?: P): void {
    const v = this.sign * value;
    if (!Number.isFinite(v) || !Number.isFinite(time)) return;
    if (v > this.best) this.best = v;
    else if (v < this.best - EQUAL_PEAK_TOLERANCE * Math.abs(this.best)) return;
    this.near.push({ value: v, time, payload });
    if (this.near.length > 64) this.prune();
  }

  private prune(): void {
    const floor = this.best - EQUAL_PEAK_TOLERANCE * Math.abs(this.best);
    this.near = this.near.filter((c) => c.value >= floor);
  }

  get has(): boolean {
    return this.near.length > 0;
  }

  get bestValue(): number {
    return this.sign * this.best;
  }

  private pick() {
    this.prune();
    let pick = this.near[0];
    for (const c of this.near) if (c.time < pick.time) pick = c;
    return pick;
  }

  result(): Extremum {
    const pick = this.pick();
    return { value: this.sign * pick.value, time: pick.time };
  }

  payload(): P | undefined {
    return this.has ? this.pick().payload : undefined;
  }
}

/** Where the current flows relative to the limiter: through it, after the relay shorted it, or no limiter. */
export type CurrentGroup = 'limited' | 'bypassed' | 'plain';

export interface PieceRecord {
  t0: number;
  t1: number;
  conducting: boolean;
  pair: number;
  group: CurrentGroup;
  /** ∫ i² dt over the piece, A²s. */
  i2t: number;
  /** ∫ R_lim·i² dt over the piece, J. */
  limiterEnergy: number;
  /** Largest current in the piece. */
  peakCurrent: number;
}

export type BridgeEventKind =
  'switch-on' | 'conduction-start' | 'conduction-end' | 'commutation' | 'bypass' | 'load-connects' | 'load-mode';

export interface BridgeEvent {
  time: number;
  kind: BridgeEventKind;
  /** The conducting pair after the event ("D1+D4"), when one conducts. */
  pair: string | null;
}

/** One instant of the waveform. */
export interface SampleRow {
  t: number;
  vC: number;
  v: number;
  i: number;
  lineCurrent: number;
  vSource: number;
  limiterPower: number;
  limiterTemperature: number;
  conducting: boolean;
  pair: number;
}

export class Recorder {
  readonly iMax = {
    all: new PeakPicker<SampleRow>(1),
    limited: new PeakPicker<SampleRow>(1),
    bypassed: new PeakPicker<SampleRow>(1),
  };
  readonly vCMax = new PeakPicker<SampleRow>(1);
  readonly vCMin = new PeakPicker<SampleRow>(-1);
  readonly vMax = new PeakPicker<SampleRow>(1);
  readonly limiterPower = new PeakPicker<SampleRow>(1);
  readonly temperature = new PeakPicker<SampleRow>(1);
  readonly pieces: PieceRecord[] = [];
  readonly events: BridgeEvent[] = [];

  offerCurrent(i: number, t: number, group: CurrentGroup, row?: SampleRow): void {
    this.iMax.all.offer(i, t, row);
    if (group !== 'plain') this.iMax[group].offer(i, t, row);
  }

  offerVoltages(vC: number, v: number, t: number, row?: SampleRow): void {
    this.vCMax.offer(vC, t, row);
    this.vCMin.offer(vC, t, row);
    this.vMax.offer(v, t, row);
  }

  event(time: number, kind: BridgeEventKind, pair: string | null): void {
    this.events.push({ time, kind, pair });
  }

  /** The rows kept with the picked peaks, to insert into the waveform. */
  peakRows(): SampleRow[] {
    const rows = [this.iMax.all, this.iMax.bypassed, this.vCMax, this.vCMin, this.vMax, this.limiterPower, this.temperature]
      .map((p) => p.payload())
      .filter((row): row is SampleRow => row !== undefined);
    return [...new Map(rows.map((row) => [row.t, row])).values()];
  }
}

export function pickOrNull(picker: PeakPicker<SampleRow>): Extremum | null {
  return picker.has ? picker.result() : null;
}

/** What either solver hands to the metrics. */
export interface MainsRaw {
  peakCurrent: Extremum;
  peakCurrentLimited: Extremum | null;
  peakCurrentAfterBypass: Extremum | null;
  peakCapacitorVoltage: Extremum;
  minCapacitorVoltage: Extremum;
  peakBusVoltage: Extremum;
  /** Peak R_lim·i² (for a fixed R: R·(peak limited current)²). */
  limiterPeakPower: Extremum | null;
  peakLimiterTemperature: Extremum | null;
  finalLimiterTemperature: number | null;
  finalCapacitorVoltage: number;
  /** When the relay closed within the run, else null. */
  bypassTime: number | null;
  pieces: PieceRecord[];
  events: BridgeEvent[];
}

export function rawOf(
  recorder: Recorder,
  extra: {
    finalCapacitorVoltage: number;
    bypassTime: number | null;
    finalLimiterTemperature: number | null;
    limiterPeakPower: Extremum | null;
  },
): MainsRaw {
  return {
    peakCurrent: recorder.iMax.all.has ? recorder.iMax.all.result() : { value: 0, time: 0 },
    peakCurrentLimited: pickOrNull(recorder.iMax.limited),
    peakCurrentAfterBypass:
      extra.bypassTime === null ? null : (pickOrNull(recorder.iMax.bypassed) ?? { value: 0, time: extra.bypassTime }),
    peakCapacitorVoltage: recorder.vCMax.result(),
    minCapacitorVoltage: recorder.vCMin.result(),
    peakBusVoltage: recorder.vMax.result(),
    limiterPeakPower: extra.limiterPeakPower,
    peakLimiterTemperature: pickOrNull(recorder.temperature),
    finalLimiterTemperature: extra.finalLimiterTemperature,
    finalCapacitorVoltage: extra.finalCapacitorVoltage,
    bypassTime: extra.bypassTime,
    pieces: recorder.pieces,
    events: recorder.events,
  };
}
