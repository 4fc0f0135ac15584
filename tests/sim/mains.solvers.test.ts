/**
 * The mains solvers against each other and the bridge's event handling on random cases (fast-check,
 * fixed seeds): the exact propagation (model.ts `exactSystem`, matrix exponential) and odex on the
 * engine's right-hand side (model.ts `evaluateAt` through sim/model/circuit.ts `evaluate`) are
 * independent encodings of the same equations and must agree to 1e−8 of the peaks on every
 * fixed-resistance case.
 */
import * as fc from 'fast-check';

import { DesignError } from '@/sim/errors';
import { largestPair } from '@/sim/mains/bridge';
import { runExact } from '@/sim/mains/exact';
import { augment, evaluateAt, exactSystem, modelOf, Z_I, Z_N, Z_VC, Z_VD, type Configuration } from '@/sim/mains/model';
import { runMainsOde } from '@/sim/mains/ode';
import { mainsPreset } from '@/sim/mains/preset';
import { parseMainsDesign, type MainsDesignInput } from '@/sim/mains/schema';
import { estimateMainsOdeCost, simulateMains, spectrumOf } from '@/sim/mains/simulate';
import { sweepSwitchOnAngle } from '@/sim/mains/sweep';

import { expectClose } from '../helpers/expectClose';

const SEED = 90210;
const TOL = 1e-8;

const logUniform = (lo: number, hi: number) => fc.double({ min: Math.log(lo), max: Math.log(hi), noNaN: true }).map(Math.exp);

/** Random fixed-resistance designs (no thermal model, no constant-power load). */
const linearDesign = fc
  .record({
    three: fc.boolean(),
    voltage: fc.double({ min: 100, max: 400, noNaN: true }),
    frequency: fc.constantFrom(50, 60),
    angle: fc.double({ min: 0, max: 360, noNaN: true }),
    lineResistance: logUniform(0.05, 5),
    lineInductance: fc.oneof(fc.constant(0), logUniform(50e-6, 2e-3)),
    forwardVoltage: fc.double({ min: 0, max: 1, noNaN: true }),
    slopeResistance: fc.double({ min: 0, max: 0.05, noNaN: true }),
    limiter: fc.oneof(
      fc.constant(null),
      fc.record({
        resistance: logUniform(1, 20),
        delay: fc.oneof(fc.constant(null), fc.double({ min: 0.005, max: 0.04, noNaN: true })),
      }),
    ),
    capacitance: logUniform(47e-6, 2.2e-3),
    esr: fc.oneof(fc.constant(0), logUniform(0.01, 0.5)),
    bleeder: fc.boolean(),
    load: fc.oneof(
      fc.constant(null),
      fc.record({
        kind: fc.constant('resistance' as const),
        value: logUniform(50, 1e4),
        start: fc.double({ min: 0, max: 0.03, noNaN: true }),
      }),
      fc.record({
        kind: fc.constant('current' as const),
        value: fc.double({ min: 0.1, max: 2, noNaN: true }),
        start: fc.double({ min: 0, max: 0.03, noNaN: true }),
      }),
    ),
    duration: fc.double({ min: 0.03, max: 0.08, noNaN: true }),
  })
  .map((p): MainsDesignInput => ({
    mains: {
      kind: p.three ? 'three-phase' : 'single-phase',
      voltage: p.voltage,
      frequency: p.frequency,
      angle: p.angle,
      lineResistance: p.lineResistance,
      lineInductance: p.lineInductance,
      diode: { forwardVoltage: p.forwardVoltage, slopeResistance: p.slopeResistance },
      limiter: p.limiter
        ? {
            kind: 'resistor',
            resistance: p.limiter.resistance,
            bypass: p.limiter.delay === null ? null : { delay: p.limiter.delay },
          }
        : { kind: 'none' },
    },
    capacitor: { capacitance: p.capacitance, esr: p.esr },
    bleeder: p.bleeder ? { resistance: 10_000 } : null,
    load: p.load,
    duration: p.duration,
  }));

function grid(duration: number, n: number): number[] {
  return Array.from({ length: n }, (_, k) => (duration * k) / (n - 1));
}

describe('the two encodings of the rectifier circuit', () => {
  it('give the same derivatives, bus voltage, current and event function (random states, seed fixed)', () => {
    fc.assert(
      fc.property(
        linearDesign,
        fc.boolean(),
        fc.integer({ min: 0, max: 5 }),
        fc.boolean(),
        fc.boolean(),
        fc.double({ min: 0, max: 0.05, noNaN: true }),
        fc.double({ min: -50, max: 50, noNaN: true }),
        fc.double({ min: 0, max: 400, noNaN: true }),
        fc.double({ min: 0, max: 400, noNaN: true }),
        (input, conducting, pairIndex, limiterIn, loadConnected, t, i, vC, vD) => {
          const model = modelOf(parseMainsDesign(input));
          const config: Configuration = {
            conducting,
            pair: pairIndex % model.bridge.pairs.length,
            limiterIn: limiterIn && model.limiter.kind !== 'none',
            loadConnected: loadConnected && model.load !== null,
          };
          const rows = exactSystem(model, config);
          const z = augment(model, t, conducting ? i : 0, vC, vD);
          const dz = new Float64Array(Z_N);
          for (let r = 0; r < Z_N; r++) for (let c = 0; c < Z_N; c++) dz[r] += rows.M[r * Z_N + c] * z[c];
          const dot = (row: Float64Array) => row.reduce((sum, x, k) => sum + x * z[k], 0);
          const ev = evaluateAt(model, config, t, [conducting ? i : 0, vC, vD], 298.15, 'off');
          const vScale = model.bridge.peak + 400;
          const iScale = vScale / Math.max(model.rLoop, 1e-3) + 50;
          expectClose(dot(rows.v), ev.v, 0, 1e-11 * vScale);
          expectClose(dot(rows.i), ev.i, 0, 1e-11 * iScale);
          expectClose(dot(rows.g), ev.g, 0, 1e-11 * vScale);
          // Rates against the size of the terms they are differences of (v − vC over ESR·C cancels).
          const terms = Math.abs(ev.v) + vC + Math.abs(ev.i) * model.esr;
          const dvScale = model.esr > 0 ? terms / (model.esr * model.c) : (Math.abs(ev.i) + iScale) / model.c;
          const diScale = model.L > 0 ? (vScale + model.rLoop * Math.abs(i) + model.rLimiterStart * Math.abs(i)) / model.L : 0;
          expectClose(dz[Z_I], conducting && model.L > 0 ? ev.dy[0] : 0, 0, 1e-11 * diScale + 1e-300);
          expectClose(dz[Z_VC], ev.dy[1], 0, 1e-11 * dvScale + 1e-300);
          expectClose(dz[Z_VD], ev.dy[2], 0, 1e-11 * dvScale + 1e-300);
        },
      ),
      { seed: SEED, numRuns: 200 },
    );
  });
});

describe('exact propagation against odex', () => {
  it(`agree to ${TOL} of the peaks on random fixed-resistance designs (seed fixed)`, () => {
    let compared = 0;
    fc.assert(
      fc.property(linearDesign, (input) => {
        const design = parseMainsDesign(input);
        const model = modelOf(design);
        fc.pre(estimateMainsOdeCost(model).evaluations < 150_000);
        compared++;
        const times = grid(design.duration, 301);
        const exact = runExact(model);
        const spectrum = spectrumOf(model);
        const ode = runMainsOde(model, {
          relativeTolerance: 1e-11,
          maxSteps: 200_000,
          sampleTimes: times,
          omegaMax: spectrum.omega,
          rho: spectrum.rho,
        });
        expect(exact.ok && ode.ok).toBe(true);
        const a = exact.raw!;
        const b = ode.raw!;
        const iScale = a.peakCurrent.value;
        const vScale = Math.max(a.peakCapacitorVoltage.value, 1);
        expectClose(b.peakCurrent.value, a.peakCurrent.value, 0, TOL * iScale);
        expectClose(b.peakCapacitorVoltage.value, a.peakCapacitorVoltage.value, 0, TOL * vScale);
        expectClose(b.finalCapacitorVoltage, a.finalCapacitorVoltage, 0, TOL * vScale);
        const i2 = (raw: typeof a) => raw.pieces.reduce((sum, p) => sum + p.i2t, 0);
        expectClose(i2(b), i2(a), TOL);
        const starts = (raw: typeof a) => raw.events.filter((e) => e.kind === 'conduction-start').map((e) => e.time);
        expect(starts(b)).toHaveLength(starts(a).length);
        starts(a).forEach((t, k) => expectClose(starts(b)[k], t, 0, TOL * design.duration));
        const rows = exact.sample(times);
        rows.forEach((row, k) => {
          expectClose(ode.samples[k].vC, row.vC, 0, TOL * vScale);
          expectClose(ode.samples[k].i, row.i, 0, TOL * iScale);
        });
      }),
      { seed: SEED, numRuns: 14 },
    );
    expect(compared).toBeGreaterThanOrEqual(8);
  });

  it('reports their agreement in the result, as the engine does', () => {
    const result = simulateMains(
      parseMainsDesign({
        mains: {
          voltage: 230,
          angle: 60,
          lineResistance: '0.5 Ω',
          lineInductance: '0.8 mH',
          limiter: { kind: 'resistor', resistance: '8 Ω' },
        },
        capacitor: { capacitance: '470 µF', esr: '0.1 Ω' },
        duration: '100 ms',
      }),
    );
    expect(result.solvers.ran).toEqual(['exact', 'odex']);
    expect(result.solvers.waveformFrom).toBe('exact');
    expect(result.solvers.maxDisagreement.vC).toBeLessThan(TOL);
    expect(result.solvers.maxDisagreement.i).toBeLessThan(TOL);
    expect(result.warnings).toEqual([]);
  });
});

/** The bridge's rules, checked on the waveform at random switch-on angles; returns the broken ones. */
function bridgeViolations(input: MainsDesignInput, angle: number): string[] {
  const design = parseMainsDesign({ ...input, mains: { ...input.mains, angle }, points: 1500 });
  const model = modelOf(design);
  const result = simulateMains(design, { crossCheck: false });
  const w = result.waveform;
  const peak = result.metrics.peakCurrent.value;
  const drop = model.bridge.drop;
  const vTol = 1e-9 * model.bridge.peak;
  const R = model.rLoop + (design.mains.limiter.kind !== 'none' ? model.rLimiterStart : 0);
  const broken: string[] = [];
  const flag = (k: number, what: string) => broken.push(`${what} at t = ${w.t[k]} (angle ${angle}°)`);
  for (let k = 0; k < w.t.length; k++) {
    // No diode conducts backwards.
    if (w.i[k] < -1e-9 * peak) flag(k, `reverse current ${w.i[k]} A`);
    const e = w.vSource[k] - drop;
    if (!w.conducting[k]) {
      // Blocking: no current, and the source less the drops never above the bus (a missed conduction start would be).
      if (w.i[k] !== 0) flag(k, `current ${w.i[k]} A while blocking`);
      if (e - w.v[k] > vTol) flag(k, `source less drops ${e - w.v[k]} V above the bus while blocking`);
    } else if (model.L === 0 && Math.abs(e - w.v[k] - R * w.i[k]) > vTol + 1e-9 * R * peak) {
      // Conducting without inductance: the bus sits R·i below the source less the drops.
      flag(k, `bus not R·i below the source (off by ${e - w.v[k] - R * w.i[k]} V)`);
    }
    if (w.conducting[k] && model.bridge.kind === 'three-phase') {
      // No missed commutation: the conducting pair is the largest line-to-line voltage's (away from the boundaries).
      const sector = (model.bridge.omega * w.t[k] + model.bridge.theta - Math.PI / 3) / (Math.PI / 3);
      const nearBoundary = Math.abs(sector - Math.round(sector)) < 1e-6;
      if (!nearBoundary && w.pair[k] !== model.bridge.pairs[largestPair(model.bridge, w.t[k])].label)
        flag(k, `pair ${w.pair[k]} is not the largest`);
    }
  }
  if (!w.conducting.some((c) => c)) broken.push(`never conducts (angle ${angle}°)`);
  return broken.slice(0, 5);
}

describe('the bridge at random switch-on angles (seed fixed)', () => {
  const cases: [string, MainsDesignInput][] = [
    [
      'single-phase, no line inductance, real diodes, light load',
      {
        mains: { voltage: 230, lineResistance: '2 Ω', diode: { forwardVoltage: '0.9 V', slopeResistance: '20 mΩ' } },
        capacitor: { capacitance: '470 µF' },
        load: { kind: 'resistance', value: '2 kΩ' },
        duration: '60 ms',
      },
    ],
    [
      'single-phase, line inductance, ESR, NTC, heavy load',
      {
        mains: {
          voltage: 230,
          lineResistance: '0.3 Ω',
          lineInductance: '0.5 mH',
          diode: { forwardVoltage: '1 V' },
          limiter: { kind: 'ntc', r25: '5 Ω', beta: '3500 K', startTemperature: '80 °C' },
        },
        capacitor: { capacitance: '470 µF', esr: '0.2 Ω' },
        load: { kind: 'resistance', value: '100 Ω' },
        duration: '60 ms',
      },
    ],
    [
      'three-phase, line inductance, relay',
      {
        mains: {
          kind: 'three-phase',
          voltage: '400 V',
          lineResistance: '0.1 Ω',
          lineInductance: '0.2 mH',
          limiter: { kind: 'resistor', resistance: '10 Ω', bypass: { delay: '25 ms' } },
        },
        capacitor: { capacitance: '1 mF', esr: '50 mΩ' },
        load: { kind: 'resistance', value: '50 Ω', start: '10 ms' },
        duration: '60 ms',
      },
    ],
    [
      'three-phase, no line inductance',
      {
        mains: { kind: 'three-phase', voltage: '400 V', lineResistance: '0.5 Ω', diode: { forwardVoltage: '0.8 V' } },
        capacitor: { capacitance: '470 µF' },
        load: { kind: 'current', value: '3 A' },
        duration: '40 ms',
      },
    ],
  ];
  it.each(cases)('%s: no reverse current, no missed conduction or commutation', (_name, input) => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 360, noNaN: true }), (angle) => {
        expect(bridgeViolations(input, angle)).toEqual([]);
      }),
      { seed: SEED, numRuns: 8 },
    );
    expect(bridgeViolations(input, 0)).toEqual([]);
    expect(bridgeViolations(input, 90)).toEqual([]);
  });
});

describe('solver paths', () => {
  it('carries a stiff loop (1 µH against 10 Ω and 470 µF) on the exact path and says why odex is skipped', () => {
    const result = simulateMains(
      parseMainsDesign({
        mains: { voltage: 230, lineResistance: '10 Ω', lineInductance: '1 µH' },
        capacitor: { capacitance: '470 µF' },
      }),
    );
    expect(result.solvers.ran).toEqual(['exact']);
    expect(result.solvers.stiff).toBe(true);
    expect(result.solvers.skipped[0].reason).toContain('stiff for an explicit integrator');
  });

  it('refuses a stiff loop on the nonlinear path with a field-named error', () => {
    const input: MainsDesignInput = {
      mains: {
        voltage: 230,
        lineResistance: '10 Ω',
        lineInductance: '0.1 µH',
        limiter: { kind: 'ntc', r25: 10, beta: 3500, thermal: { heatCapacity: 1, dissipationConstant: 0.01 } },
      },
      capacitor: { capacitance: '470 µF' },
    };
    expect(() => simulateMains(parseMainsDesign(input))).toThrow(DesignError);
    try {
      simulateMains(parseMainsDesign(input));
    } catch (error) {
      expect((error as DesignError).issues[0].path).toBe('mains.lineInductance');
    }
  });

  it('locates the peak of an algebraic current through a heating NTC (L = 0) independently of the odex tolerance', () => {
    // With L = 0, i = (e − v)/R(T): its maximum is where the source's fall and the NTC's falling resistance
    // balance, which the derivative bracket sees only with the NTC's share of di/dt included.
    const design = parseMainsDesign({
      mains: {
        voltage: 230,
        angle: 90,
        lineResistance: '0.3 Ω',
        limiter: {
          kind: 'ntc',
          r25: '10 Ω',
          beta: '3500 K',
          thermal: { heatCapacity: '0.5 J/K', dissipationConstant: '1 nW/K' },
        },
      },
      capacitor: { capacitance: '470 µF', esr: '0.1 Ω' },
      duration: '30 ms',
    });
    const model = modelOf(design);
    const spectrum = spectrumOf(model);
    const peaks = [1e-9, 1e-12].map(
      (tol) =>
        runMainsOde(model, {
          relativeTolerance: tol,
          maxSteps: 200_000,
          sampleTimes: [],
          omegaMax: spectrum.omega,
          rho: spectrum.rho,
        }).raw!.peakCurrent,
    );
    expect(peaks[0].time).toBeGreaterThan(0); // the NTC heats faster than the source falls: the peak comes later
    expectClose(peaks[0].value, peaks[1].value, 1e-8);
  });

  it('runs a constant-power load on odex, checked by a second odex run', () => {
    const result = simulateMains(
      parseMainsDesign({
        mains: {
          voltage: 230,
          angle: 45,
          lineResistance: '0.5 Ω',
          lineInductance: '0.5 mH',
          limiter: { kind: 'resistor', resistance: '5 Ω' },
        },
        capacitor: { capacitance: '470 µF', esr: '0.1 Ω' },
        load: { kind: 'power', value: '500 W', start: '20 ms', undervoltage: '200 V' },
        duration: '100 ms',
      }),
    );
    expect(result.solvers.ran).toEqual(['odex', 'odex-check']);
    expect(result.solvers.maxDisagreement.vC).toBeLessThan(1e-6);
    expect(result.solvers.maxDisagreement.i).toBeLessThan(1e-6);
    expect(Math.min(...result.waveform.i)).toBeGreaterThanOrEqual(-1e-9 * result.metrics.peakCurrent.value);
  });
});

describe('the angle sweep', () => {
  // Speed figures live in the benchmark (sim/mains/README.md), not in timed tests.
  it('runs the 37 default angles from 0° to 180° and refines the worst between its neighbours', () => {
    const design = parseMainsDesign(mainsPreset);
    const sweep = sweepSwitchOnAngle(design);
    expect(sweep.points).toHaveLength(37);
    expect(sweep.runs).toBeGreaterThan(37);
  });
});
