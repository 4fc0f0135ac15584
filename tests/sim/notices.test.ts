import { parseDesign, type DesignInput } from '@/sim/design';
import {
  buildNotices,
  HV_NO_DISCHARGE_TEXT,
  HV_NOTICE_DISCLAIMER,
  hazardFigures,
  highVoltageNotice,
  type NoticeResult,
} from '@/sim/notices';
import type { CheckMetrics } from '@/sim/ratings';

const at = (value: number, time = 1e-3) => ({ value, time });

function run(peak: number, over: Partial<CheckMetrics> = {}, extra: Partial<NoticeResult> = {}): NoticeResult {
  return {
    metrics: {
      peakCapacitorVoltage: at(peak),
      minCapacitorVoltage: at(0, 0),
      peakBusVoltage: at(peak),
      peakCurrent: at(1),
      bypassTime: null,
      finalCapacitorVoltage: peak,
      steadyStateVoltage: peak,
      ...over,
    },
    ...extra,
  };
}

const design = (input: Partial<DesignInput> & Pick<DesignInput, 'source' | 'capacitor'>) =>
  parseDesign({ duration: '10 ms', ...input });

describe('the high-voltage notice', () => {
  it('appears above 60 V with the voltage, the stored energy, the discharge time and the disclaimer', () => {
    // 400 V on 1 mF: ½·1e-3·400² = 80 J; 2.2 kΩ bleeder: 2.2 s·ln(400/60) = 4.17 s (IEC 60204-1 6.2.4 threshold).
    const d = design({
      source: { voltage: 400, resistance: 0.1 },
      capacitor: { capacitance: '1 mF' },
      bleeder: { resistance: '2.2 kΩ' },
    });
    const notices = buildNotices(d, run(400));
    const hv = notices.find((n) => n.id === 'high-voltage');
    expect(hv).toBeDefined();
    expect(hv!.severity).toBe('danger');
    expect(hv!.title).toBe('High voltage');
    expect(hv!.text).toBe(
      'This design reaches 400 V, above the 60 V DC that is safe to touch, and stores 80 J at its peak, enough to cause serious injury. ' +
        'With the source removed, the bleeder brings it below 60 V in 4.17 s. ' +
        HV_NOTICE_DISCLAIMER,
    );
    expect(HV_NOTICE_DISCLAIMER).toMatch(/design aid, not a safety certification/);
    expect(HV_NOTICE_DISCLAIMER).toMatch(/local electrical codes/);
    expect(HV_NOTICE_DISCLAIMER).toMatch(/qualified, licensed people/);
  });

  it('says when nothing discharges the link', () => {
    const d = design({ source: { voltage: 800, resistance: 0.1 }, capacitor: { capacitance: '940 µF' } });
    const hv = highVoltageNotice(d, run(800))!;
    expect(hv.text).toContain(HV_NO_DISCHARGE_TEXT);
    // ½·940e-6·800² = 300.8 J, the top NFPA 70E band (from memory).
    expect(hv.text).toMatch(/stores 301 J at its peak, enough to cause serious or fatal injury/);
  });

  it('does not appear at 48 V with small stored energy', () => {
    // 48 V on 100 µF: ½·1e-4·48² = 0.115 J, under the 1 J band (NFPA 70E practice, from memory).
    const d = design({ source: { voltage: 48, resistance: 0.05 }, capacitor: { capacitance: '100 µF' } });
    expect(buildNotices(d, run(48))).toEqual([]);
    expect(hazardFigures(d, run(48)).storedEnergy).toBeCloseTo(0.1152, 4);
  });

  it.each([
    [60, false],
    [60.5, true],
  ])('treats %f V as %s (strictly above 60 V DC, IEC 62368-1 ES1 from memory)', (volts, shown) => {
    const d = design({ source: { voltage: volts, resistance: 0.05 }, capacitor: { capacitance: '10 µF' } });
    expect(highVoltageNotice(d, run(volts)) !== null).toBe(shown);
  });

  it('appears when the result overshoots past 60 V from a 48 V source', () => {
    // An undamped hot-plug doubles the step (REFERENCE §1, R = 0): 48 V → 96 V.
    const d = design({ source: { voltage: 48, inductance: '1 µH' }, capacitor: { capacitance: '10 µF' } });
    const hv = highVoltageNotice(d, run(96))!;
    expect(hv.text).toMatch(/reaches 96 V/);
  });

  it('appears for stored energy alone at 48 V: 1.5 mF holds 1.73 J', () => {
    // ½·1.5e-3·48² = 1.728 J ≥ 1 J.
    const d = design({ source: { voltage: 48, resistance: 0.02 }, capacitor: { capacitance: '1.5 mF' } });
    const hv = highVoltageNotice(d, run(48))!;
    expect(hv.severity).toBe('warning');
    expect(hv.title).toBe('Hazardous stored energy');
    expect(hv.text).toMatch(/stays at 48 V but stores 1\.73 J at its peak, enough to arc and burn if the DC link is shorted\./);
    expect(hv.text).toContain(HV_NOTICE_DISCLAIMER);
  });

  it('is built from the design alone before any run', () => {
    const d = design({ source: { voltage: 400, resistance: 0.1 }, capacitor: { capacitance: '1 mF' } });
    expect(buildNotices(d, null).map((n) => n.id)).toEqual(['high-voltage']);
  });
});

describe('other notices', () => {
  const d48 = design({ source: { voltage: 24, resistance: 0.05 }, capacitor: { capacitance: '100 µF' } });

  it('report solvers that disagree by more than 1e-6 and stay quiet below it', () => {
    const loud = buildNotices(
      d48,
      run(24, {}, { solvers: { ran: ['exact', 'closed-form'], maxDisagreement: { vC: 3e-5, i: 2e-9 } } }),
    );
    expect(loud.map((n) => n.id)).toEqual(['solver-disagreement']);
    expect(loud[0].text).toMatch(/3\.0e-5 on the capacitor voltage and 2\.0e-9 on the current/);
    expect(
      buildNotices(d48, run(24, {}, { solvers: { ran: ['exact', 'closed-form'], maxDisagreement: { vC: 1e-6, i: 2e-9 } } })),
    ).toEqual([]);
  });

  it('say the threshold is never reached when a load holds the capacitor below it', () => {
    // 2 A through 47 Ω: settles at 400 − 94 = 306 V, below 95 % of 400 V = 380 V (REFERENCE §2).
    const d = design({
      source: { voltage: 400, resistance: 0, inductance: '10 µH' },
      precharge: { resistance: 47, bypass: { fraction: 0.95 } },
      capacitor: { capacitance: '1 mF' },
      load: { kind: 'current', value: '2 A' },
    });
    const notice = buildNotices(d, run(306, { bypassTime: null })).find((n) => n.id === 'bypass-never-closes')!;
    expect(notice.title).toBe('Bypass threshold never reached');
    expect(notice.text).toMatch(/settles at 306 V, below the 380 V \(95 % of the source\)/);
  });

  it('say the run is too short when the threshold is reachable but not reached', () => {
    const d = design({
      source: { voltage: 400, inductance: '10 µH' },
      precharge: { resistance: 47, bypass: { fraction: 0.95 } },
      capacitor: { capacitance: '1 mF' },
    });
    const notice = buildNotices(d, run(200, { bypassTime: null, finalCapacitorVoltage: 200 })).find(
      (n) => n.id === 'bypass-never-closes',
    )!;
    expect(notice.text).toMatch(/before the run ends at 200 V/);
    expect(buildNotices(d, run(400, { bypassTime: 0.15 })).some((n) => n.id === 'bypass-never-closes')).toBe(false);
  });
});
