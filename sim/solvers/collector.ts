/**
 * Collects what a solver finds while it runs — extremum candidates, ∫i² by phase group, threshold
 * crossings — and turns them into a RawRun. Shared by the exact and the ODE paths so that both
 * apply the same conventions (earliest among equal maxima, |i| from both signs).
 */
import { EQUAL_PEAK_TOLERANCE, PeakPicker, type Extremum, type RawRun } from '../metrics';

/** Where a phase sits relative to the bypass: resistor in, after the bypass closed, or neither. */
export type Group = 'open' | 'after' | 'plain';

/** Every waveform quantity at one instant, kept with a candidate so a peak can join the waveform. */
export interface PeakRow {
  t: number;
  vC: number;
  v: number;
  i: number;
  vD: number;
  prechargePower: number;
}

export class Collector {
  readonly vCMax = new PeakPicker<PeakRow>(1);
  readonly vCMin = new PeakPicker<PeakRow>(-1);
  readonly vMax = new PeakPicker<PeakRow>(1);
  readonly iMax = { all: new PeakPicker<PeakRow>(1), open: new PeakPicker<PeakRow>(1), after: new PeakPicker<PeakRow>(1) };
  readonly iMin = { all: new PeakPicker<PeakRow>(-1), open: new PeakPicker<PeakRow>(-1), after: new PeakPicker<PeakRow>(-1) };
  readonly i2 = { open: 0, after: 0, plain: 0 };

  offerVC(value: number, time: number, row?: PeakRow): void {
    this.vCMax.offer(value, time, row);
    this.vCMin.offer(value, time, row);
  }

  offerV(value: number, time: number, row?: PeakRow): void {
    this.vMax.offer(value, time, row);
  }

  offerI(value: number, time: number, group: Group, row?: PeakRow): void {
    this.iMax.all.offer(value, time, row);
    this.iMin.all.offer(value, time, row);
    if (group !== 'plain') {
      this.iMax[group].offer(value, time, row);
      this.iMin[group].offer(value, time, row);
    }
  }

  /** All three outputs at one instant. */
  offerAll(vC: number, v: number, i: number, time: number, group: Group, row?: PeakRow): void {
    this.offerVC(vC, time, row);
    this.offerV(v, time, row);
    this.offerI(i, time, group, row);
  }

  /** The rows kept with the picked peaks (where the solver supplied them). */
  peakRows(): PeakRow[] {
    const rows = [this.vCMax, this.vCMin, this.vMax, this.iMax.all, this.iMin.all, this.iMax.after, this.iMin.after]
      .map((p) => p.payload())
      .filter((row): row is PeakRow => row !== undefined);
    return [...new Map(rows.map((row) => [row.t, row])).values()];
  }

  toRaw(run: {
    bypassCrossingTime: number | null;
    bypassTime: number | null;
    residualStep: number | null;
    finalCapacitorVoltage: number;
    settleTime: number | null;
  }): RawRun {
    const closed = run.bypassTime !== null;
    return {
      vCMax: this.vCMax.result(),
      vCMin: this.vCMin.result(),
      vMax: this.vMax.result(),
      iAbsMax: absMax(this.iMax.all, this.iMin.all) ?? { value: 0, time: 0 },
      i2t: this.i2.open + this.i2.after + this.i2.plain,
      prechargeI2t: this.i2.open,
      prechargeIAbsMax: absMax(this.iMax.open, this.iMin.open)?.value ?? 0,
      bypassCrossingTime: run.bypassCrossingTime,
      bypassTime: run.bypassTime,
      residualStep: run.residualStep,
      iAbsMaxAfterBypass: closed ? absMax(this.iMax.after, this.iMin.after) : null,
      i2tAfterBypass: closed ? this.i2.after : null,
      finalCapacitorVoltage: run.finalCapacitorVoltage,
      settleTime: run.settleTime,
    };
  }
}

function absMax(max: PeakPicker<PeakRow>, min: PeakPicker<PeakRow>): Extremum | null {
  if (!max.has && !min.has) return null;
  const a = max.has ? max.result() : null;
  const b = min.has ? min.result() : null;
  const pa = a ? { value: Math.abs(a.value), time: a.time } : null;
  const pb = b ? { value: Math.abs(b.value), time: b.time } : null;
  if (!pa) return pb;
  if (!pb) return pa;
  const tol = EQUAL_PEAK_TOLERANCE * Math.max(pa.value, pb.value);
  if (Math.abs(pa.value - pb.value) <= tol) return pa.time <= pb.time ? pa : pb;
  return pa.value > pb.value ? pa : pb;
}
