// The checks and notices on the engine's own results (sim/simulate.ts).
import { parseDesign } from '@/sim/design';
import { buildNotices } from '@/sim/notices';
import { evaluateChecks, resolvePolicy, summariseChecks } from '@/sim/ratings';
import { simulate } from '@/sim/simulate';

// REFERENCE §1 case A (a step-response example in Nilsson & Riedel, Electric Circuits, ch. 8 [mem];
// values recomputed [der]): 48 V, 280 Ω, 0.1 H, 0.4 µF from rest peaks at 67.20 V.
const caseA = (ratings: Record<string, number> = {}) =>
  parseDesign({
    source: { voltage: 48, resistance: 280, inductance: 0.1 },
    capacitor: { capacitance: '0.4 µF' },
    duration: '5 ms',
    ratings,
  });

describe('checks on an engine run', () => {
  it.each([
    // 67.20 V against 100 V × 0.8 = 80 V: pass, (80 − 67.2)/80 = 16 %.
    [100, 'pass', 16],
    // against 80 V × 0.8 = 64 V: past the derated limit, inside the rating.
    [80, 'warn', -5],
    // against 63 V: over the rating.
    [63, 'fail', -33.3],
  ])('judge case A (67.20 V peak) against a %i V capacitor as %s', (rating, status, margin) => {
    const design = caseA({ capacitorVoltage: rating });
    const result = simulate(design, { points: 400 });
    const check = evaluateChecks(design, result.metrics).find((c) => c.id === 'capacitor-voltage')!;
    expect(check.value).toBeCloseTo(67.2, 2);
    expect(check.status).toBe(status);
    expect(check.marginPercent).toBeCloseTo(margin, 0);
  });

  it('flag the reverse swing of REFERENCE §1 case B (−40.0 V) on a polarised capacitor', () => {
    // Natural response example (Nilsson & Riedel [mem], recomputed [der]): 0.1 µF at 100 V, 100 mH, 560 Ω.
    const design = parseDesign({
      source: { voltage: 0, resistance: 560, inductance: 0.1 },
      capacitor: { capacitance: '0.1 µF' },
      initial: { capacitorVoltage: 100 },
      duration: '2 ms',
      ratings: { capacitorVoltage: 160 },
    });
    const check = evaluateChecks(design, simulate(design, { points: 400 }).metrics).find(
      (c) => c.id === 'capacitor-reverse-voltage',
    )!;
    expect(check.value).toBeCloseTo(40.0, 1);
    expect(check.status).toBe('fail');
    expect(check.message).toMatch(/reverses to -40 V/);
  });

  it('judge the fuse on the whole run, the bypass inrush included', () => {
    // 400 V, 1 mF, 500 Ω, 95 %, 10 mΩ: 0.16 + 20 A²s (REFERENCE §2). 60 A²s × 0.38 = 22.8 A²s: pass;
    // 50 A²s × 0.38 = 19 A²s: warn.
    const design = (fuse: number) =>
      parseDesign({
        source: { voltage: 400, resistance: 0.01, inductance: '1 µH' },
        precharge: { resistance: 500, bypass: { fraction: 0.95 } },
        capacitor: { capacitance: '1 mF' },
        // 100 kΩ: the threshold stays reachable (a 2.2 kΩ bleeder would hold the link at 326 V < 380 V).
        bleeder: { resistance: '100 kΩ' },
        duration: '2 s',
        ratings: { fuseMeltingI2t: fuse },
      });
    const fuse = (rating: number) => {
      const d = design(rating);
      return evaluateChecks(d, simulate(d, { points: 200 }).metrics).find((c) => c.id === 'fuse-i2t')!;
    };
    const generous = fuse(60);
    expect(generous.value).toBeGreaterThan(20);
    expect(generous.value).toBeLessThan(20.5);
    expect(generous.status).toBe('pass');
    expect(fuse(50).status).toBe('warn');
  });

  it('report every check not checked on an engine run of a design with no ratings, except the discharge rule', () => {
    const design = caseA();
    const checks = evaluateChecks(design, simulate(design, { points: 200 }).metrics, resolvePolicy());
    const summary = summariseChecks(checks);
    expect(summary.notChecked).toBe(14);
    // 67 V peak, no bleeder: the link never discharges (its 26.9 µC is under the 60 µC exemption, so it passes).
    expect(checks.find((c) => c.id === 'discharge')!.status).toBe('pass');
    expect(summary.worst).toBe('not-checked');
  });
});

describe('notices on an engine run', () => {
  it('carry the high-voltage notice when a 48 V step overshoots to 67 V', () => {
    const design = caseA();
    const notices = buildNotices(design, simulate(design, { points: 200 }));
    expect(notices.map((n) => n.id)).toEqual(['high-voltage']);
    expect(notices[0].text).toMatch(/reaches 67\.2 V/);
  });

  it('say the threshold is never reached when the load holds the capacitor below it', () => {
    const design = parseDesign({
      source: { voltage: 400, resistance: 0.01, inductance: '10 µH' },
      precharge: { resistance: 47, bypass: { fraction: 0.95 } },
      capacitor: { capacitance: '1 mF' },
      load: { kind: 'current', value: 2 },
      duration: '1 s',
    });
    const notices = buildNotices(design, simulate(design, { points: 200 }));
    expect(notices.map((n) => n.id)).toEqual(['high-voltage', 'bypass-never-closes']);
  });
});
