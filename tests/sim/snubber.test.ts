import { parseDesign, type DesignInput } from '@/sim/design';
import { DesignError } from '@/sim/errors';
import { presets } from '@/sim/presets';
import { simulate } from '@/sim/simulate';
import { estimateParasitics, proposeSnubber, ringMode, snubberBeforeAfter, turnOffSummary } from '@/sim/snubber';
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

/** REFERENCE §4: 400 V bus, 50 A, 20 nH loop, 1 nF switch capacitance, no resistance. */
function turnOff(over: Partial<DesignInput> = {}): DesignInput {
  return {
    source: { voltage: '400 V', inductance: '20 nH' },
    capacitor: { capacitance: '1 nF' },
    initial: { capacitorVoltage: 0, inductorCurrent: '50 A' },
    duration: '60 ns',
    points: 4000,
    ...over,
  };
}

/** Mean time between successive maxima of v in a waveform: the ring period. */
function ringPeriod(t: number[], v: number[]): number {
  const peaks: number[] = [];
  for (let k = 1; k + 1 < v.length; k++) if (v[k] > v[k - 1] && v[k] >= v[k + 1]) peaks.push(t[k]);
  return (peaks[peaks.length - 1] - peaks[0]) / (peaks.length - 1);
}

describe('undamped turn-off through the engine (derived, REFERENCE §4)', () => {
  const z0 = Math.sqrt(20e-9 / 1e-9);

  it('peaks at Vs + I0·√(L/C) = 623.6 V when the capacitor starts at the bus voltage', () => {
    const design = parseDesign(turnOff({ initial: { capacitorVoltage: '400 V', inductorCurrent: '50 A' } }));
    const { metrics } = simulate(design);
    expectClose(metrics.peakBusVoltage.value, 400 + 50 * z0, 1e-9);
    expectClose(metrics.peakBusVoltage.value, 623.6, 0, 0.05);
    // A quarter period after turn-off.
    expectClose(metrics.peakBusVoltage.time, (Math.PI / 2) * Math.sqrt(20e-9 * 1e-9), 1e-6);
  });

  it('peaks at Vs + √(Vs² + (I0·Z0)²) = 858.3 V from 0 V, ringing at 35.6 MHz', () => {
    const design = parseDesign(turnOff());
    const { metrics, waveform } = simulate(design);
    expectClose(metrics.peakBusVoltage.value, 400 + Math.hypot(400, 50 * z0), 1e-9);
    expectClose(metrics.peakBusVoltage.value, 858.3, 0, 0.05);
    const summary = turnOffSummary(design, metrics);
    expectClose(summary.ringFrequency, 1 / (2 * Math.PI * Math.sqrt(20e-9 * 1e-9)), 1e-9);
    expectClose(summary.ringFrequency, 35.6e6, 0, 0.05e6);
    expect(summary.zeta).toBeCloseTo(0, 12);
    // The engine's waveform rings at the same frequency.
    expectClose(1 / ringPeriod(waveform.t, waveform.v), 35.59e6, 2e-3);
  });
});

describe('an RC snubber at turn-off', () => {
  it('adds the step Rs·I0 at t = 0+ (the switch sees vC + Rs·i; derived, REFERENCE §4)', () => {
    // The snubber alone across the switch: C = Cs behind Rs, charged to the bus.
    const rs = 3;
    const design = parseDesign(
      turnOff({ capacitor: { capacitance: '4 nF', esr: rs }, initial: { capacitorVoltage: '400 V', inductorCurrent: '50 A' } }),
    );
    const { metrics, waveform } = simulate(design);
    expect(waveform.t[0]).toBe(0);
    expectClose(waveform.v[0], 400 + rs * 50, 1e-12);
    // ζ = (Rs/2)·√(Cs/L) = 0.67 ≥ 0.5: the step is the peak, at t = 0 (derived, REFERENCE §4).
    expect((rs / 2) * Math.sqrt(4e-9 / 20e-9)).toBeGreaterThanOrEqual(0.5);
    expectClose(metrics.peakBusVoltage.value, 400 + rs * 50, 1e-9);
    expect(metrics.peakBusVoltage.time).toBe(0);
  });

  it('with less damping (ζ = 0.2) the later ring, not the step, is the peak', () => {
    const rs = (0.2 * 2) / Math.sqrt(4e-9 / 20e-9);
    const design = parseDesign(
      turnOff({ capacitor: { capacitance: '4 nF', esr: rs }, initial: { capacitorVoltage: '400 V', inductorCurrent: '50 A' } }),
    );
    const { metrics } = simulate(design);
    expect(metrics.peakBusVoltage.value).toBeGreaterThan(400 + rs * 50);
    expect(metrics.peakBusVoltage.time).toBeGreaterThan(0);
  });

  it('dissipates Cs·V²·f_sw in its resistor (derived: ½CsV² per edge, two edges per period)', () => {
    const proposal = proposeSnubber({ lStray: 20e-9, cParasitic: 1e-9, busVoltage: 400, switchingFrequency: 100e3 });
    expectClose(proposal.cs, 4e-9, 1e-15);
    expectClose(proposal.rs, Math.sqrt(20), 1e-15);
    // 4 nF · (400 V)² · 100 kHz = 64 W.
    expectClose(proposal.resistorPower, 64, 1e-12);
    expectClose(2 * proposal.energyPerEdge * 100e3, proposal.resistorPower, 1e-12);
    expectClose(
      proposeSnubber({ lStray: 20e-9, cParasitic: 1e-9, busVoltage: 400, switchingFrequency: 100e3, multiple: 3 }).cs,
      3e-9,
      1e-15,
    );
  });
});

describe('the two-measurement parasitic estimate (derived, REFERENCE §4)', () => {
  it('recovers L and C from f1 and f2 given by the resonance formula', () => {
    const f = (l: number, c: number) => 1 / (2 * Math.PI * Math.sqrt(l * c));
    const result = estimateParasitics({ f1: f(20e-9, 1e-9), f2: f(20e-9, 4e-9), addedCapacitance: 3e-9 });
    expectClose(result.cParasitic, 1e-9, 1e-12);
    expectClose(result.lStray, 20e-9, 1e-12);
    expectClose(result.characteristicImpedance, Math.sqrt(20), 1e-12);
  });

  it("recovers them from ring frequencies measured on the engine's waveforms", () => {
    const bare = simulate(parseDesign(turnOff({ initial: { capacitorVoltage: '400 V', inductorCurrent: '50 A' } }))).waveform;
    const loaded = simulate(
      parseDesign(
        turnOff({
          capacitor: { capacitance: '3.2 nF' },
          duration: '120 ns',
          initial: { capacitorVoltage: '400 V', inductorCurrent: '50 A' },
        }),
      ),
    ).waveform;
    const f1 = 1 / ringPeriod(bare.t, bare.v);
    const f2 = 1 / ringPeriod(loaded.t, loaded.v);
    const result = estimateParasitics({ f1, f2, addedCapacitance: 2.2e-9 });
    // The ring period from a sampled waveform is good to the grid spacing (≈ 0.1 %).
    expectClose(result.cParasitic, 1e-9, 0.01);
    expectClose(result.lStray, 20e-9, 0.01);
  });

  it('names the measurement that cannot be right', () => {
    expect(fieldOf(() => estimateParasitics({ f1: 10e6, f2: 20e6, addedCapacitance: 1e-9 }))).toEqual(['f2']);
    expect(fieldOf(() => estimateParasitics({ f1: 20e6, f2: 10e6, addedCapacitance: 0 }))).toEqual(['addedCapacitance']);
    expect(fieldOf(() => proposeSnubber({ lStray: 20e-9, cParasitic: 0, busVoltage: 400, switchingFrequency: 1e5 }))).toEqual([
      'cParasitic',
    ]);
  });
});

describe('the gate-drive turn-off preset', () => {
  const design = parseDesign(presets.find((p) => p.id === 'switch-turn-off')!.design);

  it('reports peak, ring, damping and the margin to the derated switch rating', () => {
    const { metrics } = simulate(design);
    const summary = turnOffSummary(design, metrics);
    expect(summary.peakSwitchVoltage).toEqual(metrics.peakBusVoltage);
    expect(summary.overshoot).toBeCloseTo(metrics.peakBusVoltage.value - 600, 9);
    expect(summary.switchCheck?.id).toBe('switch-voltage');
    // Margin against the derated limit (the policy's factor on the 1200 V rating).
    const derated = summary.switchCheck!.deratedLimit!;
    expect(derated).toBeLessThan(1200);
    expectClose(summary.marginPercent, ((derated - metrics.peakBusVoltage.value) / derated) * 100, 1e-12);
    // The network rings; its ζ lies between the bare node's and critical.
    expect(summary.ring).not.toBeNull();
    expect(summary.zeta!).toBeGreaterThan(0);
    expect(summary.zeta!).toBeLessThan(1);
  });

  it('a proposed snubber lowers the peak and damps the ring, shown before and after', () => {
    const c = 300e-12;
    const l = 25e-9;
    const proposal = proposeSnubber({ lStray: l, cParasitic: c, busVoltage: 600, switchingFrequency: 50e3 });
    const result = snubberBeforeAfter(design, proposal, { points: 500 });
    expect(result.before.design.damping).toBeUndefined();
    expect(result.after.design.damping).toEqual({ resistance: proposal.rs, capacitance: proposal.cs });
    expect(result.peakAfter).toBeLessThan(result.peakBefore);
    expect(result.zetaAfter!).toBeGreaterThan(result.zetaBefore!);
    expect(result.overshootReductionPercent!).toBeGreaterThan(30);
    // Before: only the 0.5 Ω ESR damps the 25 nH / 300 pF node, ζ = (0.5/2)·√(C/L) = 0.0274.
    expectClose(result.zetaBefore, 0.25 * Math.sqrt(c / l), 1e-9);
    expectClose(result.ringFrequencyBefore, Math.sqrt(1 / (l * c) - (0.5 / (2 * l)) ** 2) / (2 * Math.PI), 1e-9);
    expect(result.before.waveform.t).toHaveLength(result.before.waveform.v.length);
    expect(result.after.waveform.v.length).toBeGreaterThanOrEqual(500);
    expectClose(result.stepAtTurnOff, proposal.rs * 40, 1e-12);
    expect(ringMode(parseDesign(result.after.design))!.zeta).toBeCloseTo(result.zetaAfter!, 12);
  });
});
