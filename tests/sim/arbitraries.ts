/** Random circuits for the agreement tests (fixed seeds there): realistic magnitudes, no subnormal doubles. */
import * as fc from 'fast-check';

import type { DesignInput } from '@/sim/design';

/** A log-uniform value in [lo, hi] (on a grid of 10⁶ steps, so no subnormal or edge-case doubles). */
export const logUniform = (lo: number, hi: number) =>
  fc.integer({ min: 0, max: 1_000_000 }).map((k) => Math.exp(Math.log(lo) + ((Math.log(hi) - Math.log(lo)) * k) / 1_000_000));
/** A uniform value in [lo, hi] on a grid of 10⁶ steps. */
export const uniform = (lo: number, hi: number) =>
  fc.integer({ min: 0, max: 1_000_000 }).map((k) => lo + ((hi - lo) * k) / 1_000_000);

export const seriesCircuit = fc
  .record({
    L: logUniform(1e-7, 1e-1),
    C: logUniform(1e-9, 1e-2),
    zeta: fc.oneof(fc.constant(0), fc.constant(1), logUniform(0.02, 4)),
    esrShare: uniform(0, 0.5),
    vs: uniform(-100, 800),
    v0: uniform(-200, 800),
    i0Share: uniform(-1, 1),
    periods: uniform(0.3, 6),
  })
  .map(({ L, C, zeta, esrShare, vs, v0, i0Share, periods }): DesignInput => {
    const z0 = Math.sqrt(L / C);
    const wn = 1 / Math.sqrt(L * C);
    const r = 2 * zeta * z0;
    const slow = zeta > 1 ? 2 * zeta * z0 * C : 1 / wn;
    return {
      source: { voltage: vs, resistance: r * (1 - esrShare), inductance: L },
      capacitor: { capacitance: C, esr: r * esrShare },
      initial: { capacitorVoltage: v0, inductorCurrent: (i0Share * Math.max(Math.abs(vs), Math.abs(v0), 1)) / z0 },
      duration: periods * Math.max((2 * Math.PI) / wn, 3 * slow),
    };
  });

export const fullCircuit = fc
  .record({
    L: logUniform(1e-6, 1e-2),
    C: logUniform(1e-6, 1e-3),
    zeta: logUniform(0.05, 2),
    esrShare: logUniform(0.01, 0.5),
    dampingShare: logUniform(0.3, 4),
    nd: logUniform(0.2, 5),
    bleed: fc.option(logUniform(20, 2000), { nil: undefined }),
    loadKind: fc.constantFrom('none', 'resistance', 'current'),
    loadShare: uniform(0.05, 0.5),
    startShare: uniform(0, 0.5),
    riseShare: uniform(0, 0.5),
    v0: uniform(0, 100),
    i0: uniform(-5, 5),
    noL: fc.boolean(),
  })
  .map((p): DesignInput => {
    const z0 = Math.sqrt(p.L / p.C);
    const wn = 1 / Math.sqrt(p.L * p.C);
    const duration = 6 * Math.max((2 * Math.PI) / wn, 2 * p.zeta * z0 * p.C);
    const r = 2 * p.zeta * z0;
    return {
      source: { voltage: 200, resistance: r, inductance: p.noL ? 0 : p.L, riseTime: p.riseShare * duration },
      capacitor: { capacitance: p.C, esr: p.esrShare * z0 },
      damping: { resistance: p.dampingShare * z0, capacitance: p.nd * p.C },
      bleeder: p.bleed ? { resistance: p.bleed * z0 } : undefined,
      load:
        p.loadKind === 'none'
          ? undefined
          : {
              kind: p.loadKind,
              value: p.loadKind === 'resistance' ? z0 / p.loadShare : (p.loadShare * 200) / z0,
              start: p.startShare * duration,
            },
      initial: { capacitorVoltage: p.v0, inductorCurrent: p.noL ? 0 : p.i0 },
      duration,
    };
  });
