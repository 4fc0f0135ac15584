// Every run is bounded: a ring that would need more grid intervals than the engine resolves in
// one run is refused up front, naming `duration`, instead of running for minutes.
import { DesignError, parseDesign, simulate } from '@/sim';

it('refuses an undamped 66 MHz ring over an hour, naming the duration, and says how long would work', () => {
  // ωn = 1/√(LC) = 1/√(5.748 µH · 1.0002 pF) = 4.17e8 rad/s → 66.4 MHz (derived); 3598 s is ~2.4e11 periods.
  const design = parseDesign({ source: { voltage: 177.74, inductance: 5.748e-6 }, capacitor: { capacitance: 1.0002e-12 }, duration: 3598 });
  let error: unknown;
  try {
    simulate(design, { points: 200 });
  } catch (e) {
    error = e;
  }
  expect(error).toBeInstanceOf(DesignError);
  const issue = (error as DesignError).issues[0];
  expect(issue.path).toBe('duration');
  expect(issue.message).toMatch(/66\.4 MHz/);
  expect(issue.message).toMatch(/shorten the duration/);
});

it('still runs the same ring over a duration it can resolve, with the undamped peak of 2·Vs', () => {
  // Undamped LC from rest peaks at 2·Vs (REFERENCE §1, derived).
  const design = parseDesign({ source: { voltage: 177.74, inductance: 5.748e-6 }, capacitor: { capacitance: 1.0002e-12 }, duration: 1e-6 });
  const result = simulate(design, { points: 200 });
  expect(result.metrics.peakCapacitorVoltage.value / 177.74).toBeCloseTo(2, 6);
});
