import {
  estimateRinging,
  FitError,
  inferSeriesRL,
  logDecrementFromZeta,
  naturalFrequency,
  zetaFromHalfPeriodDecrement,
  zetaFromLogDecrement,
} from '@/sim/fit';

import { expectClose } from '../helpers/expectClose';

/**
 * REFERENCE §1 case A: Vs 48 V, R 280 Ω, L 0.1 H, C 0.4 µF from rest (a step-response example in
 * Nilsson & Riedel, Electric Circuits, ch. 8 [mem]); the response, derived:
 *   v(t) = 48 − 48·e^(−1400t)·cos 4800t − 14·e^(−1400t)·sin 4800t
 * α = R/2L = 1400 s⁻¹, ωn = 1/√(LC) = 5000 rad/s, ωd = √(ωn² − α²) = 4800 rad/s.
 */
function caseA(samples: number, duration = 5e-3) {
  const t = Array.from({ length: samples }, (_, k) => (duration * k) / (samples - 1));
  const v = t.map((x) => 48 - 48 * Math.exp(-1400 * x) * Math.cos(4800 * x) - 14 * Math.exp(-1400 * x) * Math.sin(4800 * x));
  return { t, v };
}

describe('log decrement: the REFERENCE §8 worked example', () => {
  // Log decrement as in standard vibration texts (free vibration with viscous damping); the values
  // are derived: ζ = α/ωn = 1400/5000 = 0.28, δ = 2πζ/√(1 − ζ²) = 2π·0.28/0.96 = 1.8326,
  // fd = 4800/2π = 763.94 Hz, fn = fd/0.96 = 795.77 Hz; with C = 0.4 µF:
  // L = 1/((2π·795.77)²·0.4 µF) = 0.1000 H, R = 2·0.28·√(0.1/0.4e−6) = 280.0 Ω.
  it('δ = 1.8326 gives ζ = 0.2800', () => {
    expectClose(zetaFromLogDecrement(1.8326), 0.28, 0, 5e-5);
    expectClose(logDecrementFromZeta(0.28), 1.8326, 0, 5e-5);
  });

  it('the half-period decrement δ/2 gives the same ζ', () => {
    expectClose(zetaFromHalfPeriodDecrement(1.8326 / 2), 0.28, 0, 5e-5);
  });

  it('fd = 763.9 Hz and ζ = 0.28 give fn = 795.8 Hz, then L = 0.1000 H and R = 280.0 Ω with C = 0.4 µF', () => {
    const fn = naturalFrequency(763.94, 0.28);
    expectClose(fn, 795.77, 0, 0.01);
    const { inductance, resistance } = inferSeriesRL({ zeta: 0.28, fn, capacitance: 0.4e-6 });
    expectClose(inductance, 0.1, 5e-4);
    expectClose(resistance, 280, 5e-4);
  });

  it('estimateRinging finds δ, ζ and fd on the case A waveform, and the circuit back from them', () => {
    const { t, v } = caseA(5000);
    const ring = estimateRinging(t, v, { finalValue: 48 });
    // Peaks at t = kπ/ωd (k ≥ 1; t = 0 is the open start), alternating about 48 V. The first is
    // REFERENCE §1's V_pk = 67.20 V at 654.5 µs [der]: 48·e^(−1400π/4800) = 19.20 V above 48 V.
    expect(ring.peaks.length).toBeGreaterThanOrEqual(5);
    expectClose(ring.peaks[0].time, 654.5e-6, 5e-4);
    expectClose(ring.peaks[0].value + 48, 67.2, 0, 0.01);
    expect(ring.peaks[1].value).toBeLessThan(0);
    expectClose(ring.logDecrement, 1.8326, 0, 5e-4);
    expectClose(ring.zeta, 0.28, 0, 1e-4);
    expectClose(ring.fd, 763.94, 0, 0.1);
    const { inductance, resistance } = inferSeriesRL({ zeta: ring.zeta, fn: ring.fn, capacitance: 0.4e-6 });
    expectClose(inductance, 0.1, 1e-3);
    expectClose(resistance, 280, 1e-3);
  });

  it('gives the same answer in half-period mode and with the final value estimated from the tail', () => {
    const { t, v } = caseA(5000);
    const ring = estimateRinging(t, v, { mode: 'half-period' });
    expect(ring.mode).toBe('half-period');
    expectClose(ring.finalValue, 48, 1e-4);
    expectClose(ring.zeta, 0.28, 0, 2e-4);
    expectClose(ring.logDecrement, 1.8326, 0, 1e-3);
    // Each half-period decrement is δ/2.
    for (const d of ring.decrements.slice(0, 3)) expectClose(d, 1.8326 / 2, 0, 1e-3);
  });
});

describe('estimateRinging on other records', () => {
  it('reads a lightly damped current ring that starts from zero (its first lobe is a real peak)', () => {
    // i = e^(−αt)·sin(ωd t): ζ = 0.05.
    const zeta = 0.05;
    const wn = 2 * Math.PI * 1000;
    const wd = wn * Math.sqrt(1 - zeta * zeta);
    const t = Array.from({ length: 20_000 }, (_, k) => k * 1e-6);
    const i = t.map((x) => 30 * Math.exp(-zeta * wn * x) * Math.sin(wd * x));
    const ring = estimateRinging(t, i, { finalValue: 0 });
    expectClose(ring.zeta, zeta, 1e-3);
    expectClose(ring.fn, 1000, 1e-4);
    expectClose(ring.peaks[0].time, Math.atan(wd / (zeta * wn)) / wd, 1e-3);
  });

  it('honours the start and end of the window', () => {
    const { t, v } = caseA(5000);
    const ring = estimateRinging(t, v, { finalValue: 48, start: 1e-3 });
    expect(ring.peaks[0].time).toBeGreaterThan(1e-3);
    expectClose(ring.zeta, 0.28, 0, 2e-4);
  });

  it('refuses a record without enough ring, with the reason', () => {
    // First order: v = 48(1 − e^(−t/τ)), no peaks at all.
    const t = Array.from({ length: 1000 }, (_, k) => k * 1e-5);
    const v = t.map((x) => 48 * (1 - Math.exp(-x / 1e-3)));
    expect(() => estimateRinging(t, v)).toThrow(FitError);
    expect(() => estimateRinging(t, v)).toThrow(/peaks? of the ring; the full-period decrement needs 3/);
    expect(() => estimateRinging([0, 1, 2], [0, 1, 0])).toThrow(/at least 16 samples/);
  });

  it('inferSeriesRL names the bad input', () => {
    expect(() => inferSeriesRL({ zeta: 0.3, fn: 100, capacitance: 0 })).toThrow(/capacitance/);
    expect(() => inferSeriesRL({ zeta: 1.2, fn: 100, capacitance: 1e-6 })).toThrow(/ζ/);
    expect(() => inferSeriesRL({ zeta: 0.3, fn: -1, capacitance: 1e-6 })).toThrow(/natural frequency/);
  });
});
