import { parseDesign, type DesignInput } from '@/sim/design';
import { DesignError } from '@/sim/errors';
import { presets } from '@/sim/presets';
import { simulate } from '@/sim/simulate';
import {
  analyseStability,
  filterBranches,
  incrementalResistance,
  linearisedModel,
  logSweep,
  operatingPoint,
  optimalDamping,
  outputImpedance,
  type Complex,
} from '@/sim/stability';
import { expectClose } from '@/tests/helpers/expectClose';

function fieldOf(fn: () => unknown): string[] {
  try {
    fn();
  } catch (error) {
    if (error instanceof DesignError) return error.issues.map((i) => i.path);
    throw error;
  }
  throw new Error('expected a DesignError');
}

/**
 * The 96 V cargo-bike drive: 100 µH / 100 µF filter (R0 = 1 Ω, f0 = 1.59 kHz) feeding a 1.2 kW
 * inverter. Series resistance 50 mΩ is below L·P/(C·V²) ≈ 0.13 Ω, so without damping it is unstable
 * (REFERENCE §3); the optimal n = 1 damping branch (Rd = 1.449·R0, Cd = C) makes it stable.
 */
const cargoBike: DesignInput = {
  name: 'Cargo-bike drive, undamped',
  source: { voltage: '96 V', resistance: '30 mΩ', inductance: '1 µH' },
  filter: { inductance: '99 µH', resistance: '20 mΩ' },
  capacitor: { capacitance: '100 µF', esr: 0 },
  load: { kind: 'power', value: '1.2 kW', start: 0, undervoltage: '48 V' },
  duration: '8 ms',
  points: 8000,
};
const cargoBikeDamped: DesignInput = {
  ...cargoBike,
  name: 'Cargo-bike drive, damped',
  damping: { resistance: '1.449 Ω', capacitance: '100 µF' },
};

/** det(A − λI) for a real 3×3 (or smaller) matrix and complex λ. */
function characteristic(a: number[], n: number, l: Complex): Complex {
  const m = (r: number, c: number): Complex => ({ re: a[r * n + c] - (r === c ? l.re : 0), im: r === c ? -l.im : 0 });
  const mul = (x: Complex, y: Complex): Complex => ({ re: x.re * y.re - x.im * y.im, im: x.re * y.im + x.im * y.re });
  const sub = (x: Complex, y: Complex): Complex => ({ re: x.re - y.re, im: x.im - y.im });
  const add = (x: Complex, y: Complex): Complex => ({ re: x.re + y.re, im: x.im + y.im });
  if (n === 2) return sub(mul(m(0, 0), m(1, 1)), mul(m(0, 1), m(1, 0)));
  const minor = (r1: number, r2: number, c1: number, c2: number) => sub(mul(m(r1, c1), m(r2, c2)), mul(m(r1, c2), m(r2, c1)));
  return add(sub(mul(m(0, 0), minor(1, 2, 1, 2)), mul(m(0, 1), minor(1, 2, 0, 2))), mul(m(0, 2), minor(1, 2, 0, 1)));
}

describe('constant-power load at its operating point', () => {
  it('looks like the negative resistance −V²/P (derived: i = P/v, so di/dv = −P/v²)', () => {
    expect(incrementalResistance(96, 1200)).toBeCloseTo(-7.68, 12);
    // Finite difference of i = P/v at 96 V agrees with −P/V².
    const h = 1e-4;
    const slope = (1200 / (96 + h) - 1200 / (96 - h)) / (2 * h);
    expectClose(1 / slope, incrementalResistance(96, 1200), 1e-8);
  });

  it('runs at the higher root of (1 + R/Rb)v² − Vs·v + R·P = 0 (derived, REFERENCE §3)', () => {
    const op = operatingPoint(parseDesign(cargoBike));
    // R = 50 mΩ: v = (96 + √(96² − 4·0.05·1200))/2 = 95.3731 V.
    expectClose(op.v, (96 + Math.sqrt(96 * 96 - 4 * 0.05 * 1200)) / 2, 1e-14);
    expectClose(op.i, 1200 / op.v, 1e-14);
    const result = analyseStability(parseDesign(cargoBike));
    expectClose(result.incrementalResistance, -(op.v * op.v) / 1200, 1e-14);
    expectClose(result.impedance.zin, (op.v * op.v) / 1200, 1e-14);
  });

  it('names the load when there is no constant-power load or no operating point', () => {
    expect(fieldOf(() => analyseStability(parseDesign({ ...cargoBike, load: { kind: 'resistance', value: '10 Ω' } })))).toEqual([
      'load',
    ]);
    expect(fieldOf(() => analyseStability(parseDesign({ ...cargoBike, load: undefined })))).toEqual(['load']);
    // parseDesign already refuses a load the source cannot feed; a design changed after parsing is refused here too.
    const design = parseDesign(cargoBike);
    design.load!.value = 100e3;
    expect(fieldOf(() => analyseStability(design))).toEqual(['load.value']);
  });
});

describe('eigenvalues of the linearised model', () => {
  it.each([
    ['undamped (2 states, complex pair)', cargoBike],
    ['damped (3 states)', cargoBikeDamped],
    [
      'damped with ESR and a bleeder',
      { ...cargoBikeDamped, capacitor: { capacitance: '100 µF', esr: '30 mΩ' }, bleeder: { resistance: '2 kΩ' } },
    ],
  ])('are roots of det(A − λI) for the %s filter', (_name, input) => {
    const result = analyseStability(parseDesign(input as DesignInput));
    const n = result.states.length;
    expect(result.eigenvalues).toHaveLength(n);
    const scale = Math.max(...result.eigenvalues.map((e) => Math.hypot(e.re, e.im)));
    for (const e of result.eigenvalues) {
      const d = characteristic(result.stateMatrix, n, e);
      expect(Math.hypot(d.re, d.im)).toBeLessThan(1e-9 * scale ** n);
    }
    const trace = Array.from({ length: n }, (_, k) => result.stateMatrix[k * n + k]).reduce((a, b) => a + b, 0);
    expectClose(
      result.eigenvalues.reduce((s, e) => s + e.re, 0),
      trace,
      1e-10,
    );
    expect(Math.abs(result.eigenvalues.reduce((s, e) => s + e.im, 0))).toBeLessThan(1e-9 * scale);
  });

  it('match the series-RLC characteristic polynomial LCs² + (RC − LP/V²)s + (1 − RP/V²) (derived)', () => {
    const design = parseDesign(cargoBike);
    const { v } = operatingPoint(design);
    const [L, C, R, P] = [100e-6, 100e-6, 0.05, 1200];
    const b = (R * C - (L * P) / (v * v)) / (L * C);
    const c = (1 - (R * P) / (v * v)) / (L * C);
    const result = analyseStability(design);
    expectClose(result.eigenvalues[0].re, -b / 2, 1e-10);
    expectClose(Math.abs(result.eigenvalues[0].im), Math.sqrt(c - (b * b) / 4), 1e-10);
  });

  // Series R only: stable iff L·P/(C·V²) < R < V²/P (derived, REFERENCE §3: the s¹ and s⁰ coefficients above).
  it.each([
    [0.98, false],
    [1.02, true],
  ])('series R at %s × L·P/(C·V²) is stable: %s', (factor, stable) => {
    // Operating voltage depends on R only weakly; iterate once so the bound uses the actual V.
    let r = (100e-6 * 1200) / (100e-6 * 96 * 96);
    for (let k = 0; k < 4; k++) {
      const v = (96 + Math.sqrt(96 * 96 - 4 * r * factor * 1200)) / 2;
      r = (100e-6 * 1200) / (100e-6 * v * v);
    }
    const design = parseDesign({
      ...cargoBike,
      source: { voltage: '96 V', resistance: r * factor, inductance: '1 µH' },
      filter: { inductance: '99 µH' },
    });
    expect(analyseStability(design).stable).toBe(stable);
  });
});

describe('filter output impedance (Middlebrook)', () => {
  it('is the parallel combination of the branches, checked against a direct formula at one frequency', () => {
    const design = parseDesign({
      ...cargoBikeDamped,
      capacitor: { capacitance: '100 µF', esr: '30 mΩ' },
      bleeder: { resistance: '2 kΩ' },
    });
    const f = 1234;
    const w = 2 * Math.PI * f;
    // Hand-expanded: 1/Z = 1/(R + jωL) + 1/(ESR + 1/jωC) + 1/(Rd + 1/jωCd) + 1/Rb.
    const inv = (re: number, im: number) => [re / (re * re + im * im), -im / (re * re + im * im)];
    const parts = [inv(0.05, w * 100e-6), inv(0.03, -1 / (w * 100e-6)), inv(1.449, -1 / (w * 100e-6)), inv(2000, 0)];
    const y = parts.reduce((s, p) => [s[0] + p[0], s[1] + p[1]], [0, 0]);
    const z = inv(y[0], y[1]);
    const got = outputImpedance(filterBranches(design), f);
    expectClose(got.re, z[0], 1e-12);
    expectClose(got.im, z[1], 1e-12);
  });

  it('sweeps 10 Hz–1 MHz at 50 points per decade by default and reports the tightest point', () => {
    const result = analyseStability(parseDesign(cargoBike));
    expect(result.impedance.f).toHaveLength(5 * 50 + 1);
    expectClose(result.impedance.f[0], 10, 1e-15);
    expectClose(result.impedance.f[250], 1e6, 1e-15);
    expectClose(result.impedance.f[50], 100, 1e-12);
    expect(result.impedance.zout).toHaveLength(251);
    expect(result.impedance.zoutPhase).toHaveLength(251);
    // The refined peak is at least as high as every swept point and near f0 = 1/(2π√(LC)) = 1.59 kHz.
    expect(result.peak.zout).toBeGreaterThanOrEqual(Math.max(...result.impedance.zout));
    expectClose(result.peak.f, 1 / (2 * Math.PI * Math.sqrt(100e-6 * 100e-6)), 0.01);
    expectClose(result.marginDb, 20 * Math.log10(result.impedance.zin / result.peak.zout), 1e-12);
    expect(result.tightest).toEqual({ f: result.peak.f, marginDb: result.marginDb });
    // Undamped: 50 mΩ of series R leaves a peak near Q·R0 = 20 Ω, well above |Zin| = 7.58 Ω.
    expect(result.marginDb).toBeLessThan(-6);
  });

  it('honours a custom sweep', () => {
    const result = analyseStability(parseDesign(cargoBike), { fMin: 100, fMax: 1e4, pointsPerDecade: 10 });
    expect(result.impedance.f).toHaveLength(21);
    expect(fieldOf(() => analyseStability(parseDesign(cargoBike), { fMin: 1e4, fMax: 100 }))).toEqual(['fMax']);
  });
});

describe('optimal RC parallel damping', () => {
  // Erickson & Maksimović, Fundamentals of Power Electronics, 2nd ed., ch. 10 "Input filter design":
  // Rd/R0 = √[(2+n)(4+3n)/(2n²(4+n))], peak |Zo| = R0·√(2(2+n))/n. Worked values REFERENCE §3 (recomputed).
  it.each([
    [1, 1.449, 2.449],
    [4, 0.612, 0.866],
  ])('for Lf 10 µH, Cf 10 µF, n = %s gives Rd %s Ω and a peak of %s Ω', (n, rd, peak) => {
    const result = optimalDamping({ inductance: 10e-6, capacitance: 10e-6, n });
    // The published values are given to three decimals: within half a unit of the last digit.
    expectClose(result.rd, rd, 0, 5e-4);
    expectClose(result.peakZout, peak, 0, 5e-4);
    expectClose(result.cd, n * 10e-6, 1e-15);
    expectClose(result.peakFrequency, (1 / (2 * Math.PI * Math.sqrt(1e-10))) * Math.sqrt(2 / (2 + n)), 1e-12);
  });

  it.each([0.5, 1, 1.35, 4])('at n = %s, matches the peak of our own impedance sweep of the damped filter', (n) => {
    const L = 10e-6;
    const C = 10e-6;
    const helper = optimalDamping({ inductance: L, capacitance: C, n });
    const design = parseDesign({
      source: { voltage: '24 V', inductance: L },
      capacitor: { capacitance: C },
      damping: { resistance: helper.rd, capacitance: helper.cd },
      load: { kind: 'power', value: '1 W' },
      duration: '1 ms',
    });
    // A 1 W load is far from the filter's impedance: this is the filter's own sweep.
    const result = analyseStability(design, { fMin: 1e3, fMax: 1e5, pointsPerDecade: 200 });
    expectClose(result.peak.zout, helper.peakZout, 1e-6);
    expectClose(result.peak.f, helper.peakFrequency, 1e-3);
    // And it is the optimum: a 10 % change of Rd either way raises the peak.
    for (const k of [0.9, 1.1]) {
      const other = { ...filterBranches(design), damping: { resistance: helper.rd * k, capacitance: helper.cd } };
      const peak = Math.max(
        ...logSweep(1e3, 1e5, 400).map((f) => Math.hypot(outputImpedance(other, f).re, outputImpedance(other, f).im)),
      );
      expect(peak).toBeGreaterThan(helper.peakZout);
    }
  });

  it('names the bad input', () => {
    expect(fieldOf(() => optimalDamping({ inductance: 10e-6, capacitance: 10e-6, n: 0 }))).toEqual(['n']);
    expect(fieldOf(() => optimalDamping({ inductance: 0, capacitance: 10e-6, n: 1 }))).toEqual(['inductance']);
  });
});

describe('the time-domain run agrees with the linear verdict', () => {
  /** Peak |v − V| in each ring period after the load starts (the load is on from t = 0 here). */
  function envelope(input: DesignInput, periods: number) {
    const nominal = parseDesign(input);
    const op = operatingPoint(nominal);
    // Start 1 V above the operating point with the operating current flowing: a small kick.
    const design = parseDesign({
      ...input,
      initial: { capacitorVoltage: op.v + 1, inductorCurrent: op.i, dampingVoltage: op.v },
    });
    const stability = analyseStability(design);
    const period = 1 / stability.leastDampedFrequency;
    const { t, v } = simulate(design).waveform;
    const amplitudes = Array.from({ length: periods }, () => 0);
    for (let j = 0; j < t.length; j++) {
      const k = Math.floor(t[j] / period);
      if (k < periods) amplitudes[k] = Math.max(amplitudes[k], Math.abs(v[j] - op.v));
    }
    return { stability, period, amplitudes };
  }

  it('undamped: "unstable", and the oscillation grows at the rate of the unstable eigenvalue', () => {
    const { stability, period, amplitudes } = envelope(cargoBike, 8);
    expect(stability.stable).toBe(false);
    expect(stability.verdict).toMatch(/^Unstable/);
    expect(stability.leastDampedZeta).toBeLessThan(0);
    for (let k = 2; k < 8; k++) expect(amplitudes[k]).toBeGreaterThan(amplitudes[k - 1]);
    // Envelope growth between periods 1 and 7 (still small-signal: under 10 V) against Re λ.
    const rate = Math.log(amplitudes[7] / amplitudes[1]) / (6 * period);
    expectClose(rate, stability.eigenvalues[0].re, 0.03);
  });

  it('damped: "stable", and the same kick decays at the rate of the least-damped eigenvalue', () => {
    const { stability, period, amplitudes } = envelope(cargoBikeDamped, 5);
    expect(stability.stable).toBe(true);
    expect(stability.verdict).toMatch(/^Stable/);
    expect(stability.marginDb).toBeGreaterThan(6);
    for (let k = 1; k < 5; k++) expect(amplitudes[k]).toBeLessThan(amplitudes[k - 1]);
    const slow = stability.modes.find((m) => m.frequency > 0)!;
    const rate = Math.log(amplitudes[4] / amplitudes[1]) / (3 * period);
    expectClose(rate, slow.eigenvalue.re, 0.03);
  });
});

describe('the cargo-bike preset', () => {
  it('is stable with margin, and the linearised model has the three states i, vC, vD', () => {
    const design = parseDesign(presets.find((p) => p.id === 'lc-filter')!.design);
    const result = analyseStability(design);
    expect(result.states).toEqual(['i', 'vC', 'vD']);
    expect(result.stable).toBe(true);
    expect(result.marginDb).toBeGreaterThan(6);
    expect(linearisedModel(design, 0).n).toBe(3);
  });
});
