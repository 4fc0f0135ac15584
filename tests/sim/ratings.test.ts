import { parseDesign, type DesignInput } from '@/sim/design';
import { DesignError } from '@/sim/errors';
import {
  defaultDerating,
  defaultDischarge,
  defaultPolicy,
  deratingPolicySchema,
  evaluateChecks,
  marginPercentOf,
  resolvePolicy,
  statusFor,
  summariseChecks,
  worstStatus,
  type Check,
  type CheckMetrics,
} from '@/sim/ratings';

// Local tolerance helper (the shared tests/helpers/expectClose.ts may not exist yet).
function expectClose(actual: number | null | undefined, expected: number, relTol: number, absTol = 0) {
  expect(actual).not.toBeNull();
  expect(actual).not.toBeUndefined();
  const error = Math.abs((actual as number) - expected);
  if (error > Math.max(absTol, relTol * Math.abs(expected))) {
    throw new Error(`expected ${actual} to be within ${relTol} (rel) / ${absTol} (abs) of ${expected}`);
  }
}

const at = (value: number, time = 1e-3) => ({ value, time });

function design(extra: Partial<DesignInput> = {}) {
  return parseDesign({
    source: { voltage: '400 V', resistance: '10 mΩ', inductance: '10 µH' },
    precharge: { resistance: '47 Ω', bypass: { fraction: 0.95, delay: '20 ms' } },
    capacitor: { capacitance: '1 mF' },
    duration: '1 s',
    ...extra,
  });
}

/** A plausible precharge run of `design()`; each test overrides what it looks at. */
function metrics(over: Partial<CheckMetrics> = {}): CheckMetrics {
  return {
    peakCapacitorVoltage: at(400),
    minCapacitorVoltage: at(0, 0),
    peakBusVoltage: at(400),
    peakCurrent: at(8.5, 0),
    i2t: 20.9,
    prechargeEnergy: 79.8,
    prechargePeakPower: 3404,
    bypassTime: 0.161,
    residualStep: 15,
    peakCurrentAfterBypass: 120,
    i2tAfterBypass: 11,
    finalCapacitorVoltage: 400,
    steadyStateVoltage: 400,
    ...over,
  };
}

const byId = (checks: Check[], id: string) => {
  const check = checks.find((c) => c.id === id);
  if (!check) throw new Error(`no check ${id}`);
  return check;
};

describe('derating defaults', () => {
  it('judge switch voltage against the repetitive MIL-DTL-917 figure of 0.7 × rated', () => {
    // MIL-DTL-917, FET derating table (REFERENCE §5 [pub]): repetitive 0.7, non-repetitive 0.8;
    // power-up and switching overshoots recur, so 0.7.
    expect(defaultDerating.switchVoltage.factor).toBe(0.7);
    expect(defaultDerating.switchVoltage.source).toMatch(/MIL-DTL-917/);
  });

  it('allow 38 % of a fuse melting I²t, the common figure for 1 000 pulses', () => {
    // REFERENCE §5 [cp]: about 22 % for 100 000 pulses, 38 % for 1 000.
    expect(defaultDerating.fuseMeltingI2t.factor).toBe(0.38);
  });

  it('take the touch-safe discharge rule from IEC 60204-1:2016, 6.2.4: 60 V within 5 s, 60 µC exempt', () => {
    // IEC 60204-1:2016, 6.2.4 (REFERENCE §6 [pub]).
    expect(defaultDischarge.thresholdVoltage).toBe(60);
    expect(defaultDischarge.allowedTime).toBe(5);
    expect(defaultDischarge.exemptCharge).toBeCloseTo(60e-6, 12);
    expect(defaultDischarge.source).toMatch(/IEC 60204-1:2016, 6\.2\.4/);
  });

  it('name a source for every factor and keep every factor in (0, 1]', () => {
    for (const [key, rule] of Object.entries(defaultDerating)) {
      expect({ key, ok: rule.factor > 0 && rule.factor <= 1 }).toEqual({ key, ok: true });
      expect(rule.source.length).toBeGreaterThan(10);
    }
  });
});

describe('status boundaries', () => {
  // A 450 V capacitor at the default 0.8: derated limit 360 V. At the derated limit is a pass, at the
  // rating a warn, past it a fail (documented in sim/ratings/status.ts and README).
  const limit = 450;
  const derated = limit * 0.8;
  it.each([
    ['just under the derated limit', 359.9, 'pass'],
    ['at the derated limit', derated, 'pass'],
    ['just over the derated limit', 360.1, 'warn'],
    ['just under the rating', 449.9, 'warn'],
    ['at the rating', 450, 'warn'],
    ['just over the rating', 450.1, 'fail'],
  ])('%s (%f V) is a %s', (_name, value, expected) => {
    expect(statusFor(value, limit, derated)).toBe(expected);
    const checks = evaluateChecks(design({ ratings: { capacitorVoltage: limit } }), metrics({ peakCapacitorVoltage: at(value) }));
    expect(byId(checks, 'capacitor-voltage').status).toBe(expected);
  });

  it('reads a metric of exactly 360 V as at the 450 V × 0.8 limit despite floating point', () => {
    expect(statusFor(360, 450, 450 * 0.8)).toBe('pass');
    expect(statusFor(360 * (1 + 1e-6), 450, 450 * 0.8)).toBe('warn');
  });

  it('gives margin as headroom over the derated limit: (derated − value)/derated · 100', () => {
    // 342 V against 360 V: (360 − 342)/360 = 5 %; 396 V: −10 %.
    expectClose(marginPercentOf(342, 360), 5, 1e-12);
    expectClose(marginPercentOf(396, 360), -10, 1e-12);
    const check = byId(
      evaluateChecks(design({ ratings: { capacitorVoltage: 450 } }), metrics({ peakCapacitorVoltage: at(342) })),
      'capacitor-voltage',
    );
    expectClose(check.marginPercent, 5, 1e-12);
    expect(check.deratedLimit).toBeCloseTo(360, 9);
    expect(check.limit).toBe(450);
  });
});

describe('capacitor voltage check', () => {
  it('words a failure the way the product speaks', () => {
    // DESIGN.md's voice example: 612 V against a 450 V rating is (612 − 450)/450 = 36 % over.
    const check = byId(
      evaluateChecks(design({ ratings: { capacitorVoltage: '450 V' } }), metrics({ peakCapacitorVoltage: at(612) })),
      'capacitor-voltage',
    );
    expect(check.status).toBe('fail');
    expect(check.message).toBe(
      "The capacitor peaks at 612 V, 36 % over its 450 V rating. Add series resistance or damping, or raise the capacitor's rating.",
    );
    expect(check.basis).toBe('peak capacitor voltage vs rated voltage × 0.8 (common practice for aluminium electrolytics)');
  });

  it('uses the factor a design sets in its own derating section', () => {
    const d = design({ ratings: { capacitorVoltage: 450 }, derating: { capacitorVoltage: 0.9 } });
    const check = byId(evaluateChecks(d, metrics({ peakCapacitorVoltage: at(400) })), 'capacitor-voltage');
    expect(check.deratedLimit).toBeCloseTo(405, 9);
    expect(check.status).toBe('pass');
    expect(check.basis).toMatch(/× 0\.9 \(set in this design\)/);
  });

  it('flags a reverse swing past 1.5 V on a rated (polarised) capacitor and lets a film capacitor off', () => {
    // REFERENCE §1 case B rings a capacitor to −40.0 V.
    const d = design({ ratings: { capacitorVoltage: 450 } });
    const reversed = metrics({ minCapacitorVoltage: at(-40, 327e-6) });
    expect(byId(evaluateChecks(d, reversed), 'capacitor-reverse-voltage').status).toBe('fail');
    expect(byId(evaluateChecks(d, metrics({ minCapacitorVoltage: at(-1.2) })), 'capacitor-reverse-voltage').status).toBe('pass');
    const film = resolvePolicy({ capacitorReverseVoltage: { limit: null } });
    expect(byId(evaluateChecks(d, reversed, film), 'capacitor-reverse-voltage').status).toBe('not-checked');
  });
});

describe('a design with no ratings', () => {
  it('reports every rating check as not checked, never as a pass', () => {
    const checks = evaluateChecks(design({ bleeder: { resistance: '2.2 kΩ' } }), metrics());
    const ratingChecks = checks.filter((c) => c.id !== 'discharge');
    expect(ratingChecks.length).toBe(14);
    for (const check of ratingChecks) {
      expect({ id: check.id, status: check.status }).toEqual({ id: check.id, status: 'not-checked' });
      expect(check.limit).toBeNull();
      expect(check.marginPercent).toBeNull();
    }
    expect(byId(checks, 'capacitor-voltage').message).toBe(
      "The capacitor peaks at 400 V; the capacitor's rated voltage is not given, so this is not checked.",
    );
    // The discharge check follows the safety rule, not a part rating: 2.2 kΩ · 1 mF · ln(400/60) = 4.17 s.
    expect(byId(checks, 'discharge').status).toBe('pass');
  });
});

describe('checks that depend on the bypass', () => {
  const all = {
    capacitorVoltage: 450,
    contactorMakeCurrent: 500,
    contactorCarryCurrent: 50,
    prechargeContinuousPower: 25,
    prechargePulseEnergy: 200,
  };

  it('judge the contactor on the peak after the bypass and on the final current', () => {
    const d = design({ ratings: all, load: { kind: 'resistance', value: '20 Ω' } });
    const checks = evaluateChecks(d, metrics());
    expect(byId(checks, 'contactor-make-current').value).toBe(120);
    expect(byId(checks, 'contactor-make-current').status).toBe('pass');
    // 400 V into 20 Ω = 20 A, inside 50 A × 0.8 = 40 A.
    expectClose(byId(checks, 'contactor-carry-current').value, 20, 1e-12);
    expect(byId(checks, 'precharge-continuous-power').status).toBe('not-checked');
    expect(byId(checks, 'precharge-continuous-power').message).toMatch(/bypass closes at 161 ms/);
  });

  it('when the bypass never closes, check the resistor for continuous power and say the contactor does not apply', () => {
    // With a 2 A load held through 47 Ω the capacitor settles at 400 − 94 = 306 V < 380 V (REFERENCE §2).
    const d = design({ ratings: all, load: { kind: 'current', value: '2 A' } });
    const checks = evaluateChecks(d, metrics({ bypassTime: null, peakCurrentAfterBypass: null, finalCapacitorVoltage: 306 }));
    const power = byId(checks, 'precharge-continuous-power');
    // I²R = 2² · 47 = 188 W, over the 25 W rating.
    expectClose(power.value, 188, 1e-12);
    expect(power.status).toBe('fail');
    expect(byId(checks, 'contactor-make-current').status).toBe('not-checked');
    expect(byId(checks, 'contactor-make-current').message).toMatch(/never closes/);
    expect(byId(checks, 'contactor-carry-current').status).toBe('not-checked');
  });

  it('treat the contactor of a design without precharge as the switch that makes the whole inrush', () => {
    const d = parseDesign({
      source: { voltage: 48, resistance: 0.02 },
      capacitor: { capacitance: '1.5 mF' },
      duration: '5 ms',
      ratings: { contactorMakeCurrent: 1000 },
    });
    const check = byId(
      evaluateChecks(d, metrics({ peakCurrent: at(2400), peakCurrentAfterBypass: null, bypassTime: null })),
      'contactor-make-current',
    );
    expect(check.value).toBe(2400);
    expect(check.status).toBe('fail');
    expect(byId(evaluateChecks(d, metrics()), 'precharge-pulse-energy').message).toMatch(/no precharge resistor/);
  });
});

describe('discharge check', () => {
  // t = R·C·ln(V0/60 V) (REFERENCE §6 [der]); 400 V, 1 mF: ln(400/60) = 1.8971.
  it('passes a 2.2 kΩ bleeder on 1 mF at 400 V: 4.17 s', () => {
    const check = byId(evaluateChecks(design({ bleeder: { resistance: '2.2 kΩ' } }), metrics()), 'discharge');
    expectClose(check.value, 2200 * 1e-3 * Math.log(400 / 60), 1e-12);
    expectClose(check.value, 4.1737, 1e-4);
    expect(check.status).toBe('pass');
    expect(check.message).toBe(
      'With the source removed, the bleeder brings the DC link from 400 V below 60 V in 4.17 s, inside the 5 s allowed.',
    );
  });

  it('fails 3.3 kΩ (6.26 s) and names the largest bleeder that would do: 2.64 kΩ, 60.7 W', () => {
    // REFERENCE §6: 400 V, 1 mF → 60 V in 5 s needs Rb ≤ 2.64 kΩ (60.7 W continuous).
    const check = byId(evaluateChecks(design({ bleeder: { resistance: '3.3 kΩ' } }), metrics()), 'discharge');
    expectClose(check.value, 6.2604, 1e-4);
    expect(check.status).toBe('fail');
    expect(check.message).toMatch(/at most 2\.64 kΩ \(it dissipates 60\.7 W at 400 V\)/);
  });

  it('fails a design with no bleeder and no load: it never discharges', () => {
    const check = byId(evaluateChecks(design(), metrics()), 'discharge');
    expect(check.status).toBe('fail');
    expect(check.value).toBeNull();
    expect(check.message).toMatch(/never discharges/);
  });

  it('counts a resistive load only when the policy says it stays connected', () => {
    const d = design({ load: { kind: 'resistance', value: '2.2 kΩ' } });
    expect(byId(evaluateChecks(d, metrics()), 'discharge').status).toBe('fail');
    const policy = resolvePolicy({ discharge: { loadStaysConnected: true } });
    const check = byId(evaluateChecks(d, metrics(), policy), 'discharge');
    expect(check.status).toBe('pass');
    expect(check.message).toMatch(/the load brings/);
  });

  it('starts from the peak, not the final voltage', () => {
    // 2.2 kΩ, 1 mF from a 480 V overshoot: 2.2 · ln(8) = 4.575 s.
    const check = byId(
      evaluateChecks(design({ bleeder: { resistance: 2200 } }), metrics({ peakCapacitorVoltage: at(480) })),
      'discharge',
    );
    expectClose(check.value, 2.2 * Math.log(8), 1e-12);
  });

  it('passes a 48 V link with no discharge path and a 50 µC link under the IEC 60204-1 exemption', () => {
    const low = parseDesign({
      source: { voltage: 48, resistance: 0.05 },
      capacitor: { capacitance: '100 µF' },
      duration: '1 ms',
    });
    expect(
      byId(
        evaluateChecks(low, metrics({ peakCapacitorVoltage: at(52), finalCapacitorVoltage: 48, steadyStateVoltage: 48 })),
        'discharge',
      ).status,
    ).toBe('pass');
    // 100 V on 0.5 µF is 50 µC ≤ 60 µC (IEC 60204-1:2016, 6.2.4).
    const small = parseDesign({
      source: { voltage: 100, resistance: 1 },
      capacitor: { capacitance: '0.5 µF' },
      duration: '1 ms',
    });
    const check = byId(
      evaluateChecks(small, metrics({ peakCapacitorVoltage: at(100), finalCapacitorVoltage: 100, steadyStateVoltage: 100 })),
      'discharge',
    );
    expect(check.status).toBe('pass');
    expect(check.message).toMatch(/50 µC/);
  });

  it('uses the threshold and time a team sets', () => {
    const policy = resolvePolicy({ discharge: { thresholdVoltage: 30, allowedTime: 10 } });
    const check = byId(evaluateChecks(design({ bleeder: { resistance: 2200 } }), metrics(), policy), 'discharge');
    expectClose(check.value, 2.2 * Math.log(400 / 30), 1e-12);
    expect(check.limit).toBe(10);
    expect(check.basis).toMatch(/team policy/);
  });
});

describe('policy resolution', () => {
  it('applies the team policy and then the design on top', () => {
    const policy = resolvePolicy(
      { factors: { capacitorVoltage: 0.7, switchVoltage: { factor: 0.6, source: 'Northfold rule 4' } } },
      { capacitorVoltage: 0.75 },
    );
    expect(policy.factors.capacitorVoltage).toEqual({ factor: 0.75, source: 'set in this design' });
    expect(policy.factors.switchVoltage).toEqual({ factor: 0.6, source: 'Northfold rule 4' });
    expect(policy.factors.fuseMeltingI2t).toEqual(defaultPolicy.factors.fuseMeltingI2t);
  });

  it.each([
    [{ factors: { capacitorVoltage: 1.2 } }, undefined, 'policy.factors.capacitorVoltage'],
    [{ factors: { capacitorVoltage: 0 } }, undefined, 'policy.factors.capacitorVoltage'],
    [{ factors: { capacitorVoltag: 0.8 } }, undefined, 'policy.factors.capacitorVoltag'],
    [{ discharge: { allowedTime: -1 } }, undefined, 'policy.discharge.allowedTime'],
    [undefined, { diodeI2t: 1.5 }, 'derating.diodeI2t'],
  ])('rejects %j / %j naming %s', (team, own, path) => {
    let error: unknown;
    try {
      resolvePolicy(team, own);
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(DesignError);
    expect((error as DesignError).issues.map((i) => i.path)).toContain(path);
  });

  it('exposes the team override schema for admin edits', () => {
    expect(deratingPolicySchema.safeParse({ factors: { diodeSurgeCurrent: 0.6 } }).success).toBe(true);
    expect(deratingPolicySchema.safeParse({ factors: { diodeSurgeCurrent: 2 } }).success).toBe(false);
  });
});

describe('roll-up', () => {
  it('ranks fail over warn over not checked over pass', () => {
    const s = (status: Check['status']) => ({ status });
    expect(worstStatus([s('pass'), s('not-checked')])).toBe('not-checked');
    expect(worstStatus([s('pass'), s('warn'), s('not-checked')])).toBe('warn');
    expect(worstStatus([s('warn'), s('fail')])).toBe('fail');
    expect(worstStatus([s('pass')])).toBe('pass');
    expect(worstStatus([])).toBe('not-checked');
    expect(summariseChecks([s('pass'), s('pass'), s('warn'), s('not-checked')])).toEqual({
      pass: 2,
      warn: 1,
      fail: 0,
      notChecked: 1,
      worst: 'warn',
    });
  });
});
