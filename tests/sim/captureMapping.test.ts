import {
  alignCapture,
  captureResidual,
  CaptureError,
  decimate,
  interpolate,
  mapCapture,
  parseCapture,
  resampleOnto,
  type Capture,
} from '@/sim/capture';
import { DesignError } from '@/sim';

function issuesOf(run: () => unknown): { path: string; message: string }[] {
  try {
    run();
  } catch (error) {
    if (error instanceof DesignError) return error.issues;
    throw error;
  }
  throw new Error('expected a DesignError');
}

const scope = parseCapture('Time (us),CH1 (mV),CH2 (mA),CH3\n-2,100,5,9\n0,200,10,8\n2,300,15,7\n4,400,20,6\n');

function capture(time: number[], ...channels: number[][]): Capture {
  return {
    time: Float64Array.from(time),
    channels: channels.map((values, k) => ({
      column: k + 1,
      name: `CH${k + 1}`,
      quantity: k === 0 ? 'capacitorVoltage' : 'current',
      unit: k === 0 ? 'V' : 'A',
      values: Float64Array.from(values),
    })),
    alignment: 0,
  };
}

describe('mapCapture', () => {
  it('converts the mapped columns to seconds, volts and amperes, with the probe scale', () => {
    const mapped = mapCapture(scope, {
      time: { column: 0, unit: 'us' },
      channels: [
        { column: 1, quantity: 'capacitorVoltage', unit: 'mV', scale: 10 },
        { column: 2, quantity: 'current', unit: 'mA' },
      ],
    });
    expect(Array.from(mapped.time)).toEqual([-2e-6, 0, 2e-6, 4e-6]);
    expect(Array.from(mapped.channels[0].values)).toEqual([1, 2, 3, 4]);
    expect(mapped.channels[0]).toMatchObject({ name: 'CH1 (mV)', quantity: 'capacitorVoltage', unit: 'V', column: 1 });
    expect(Array.from(mapped.channels[1].values)).toEqual([0.005, 0.01, 0.015, 0.02]);
    expect(mapped.channels[1].unit).toBe('A');
    expect(mapped.alignment).toBe(0);
  });

  it.each([
    ['ms', 1e-3],
    ['ns', 1e-9],
    ['s', 1],
  ] as const)('reads a time column in %s', (unit, factor) => {
    const mapped = mapCapture(scope, {
      time: { column: 0, unit },
      channels: [{ column: 3, quantity: 'busVoltage', unit: 'kV' }],
    });
    expect(mapped.time[3]).toBeCloseTo(4 * factor, 15);
    expect(mapped.channels[0].values[0]).toBe(9000);
  });

  it('applies the file time offset in the file unit before converting', () => {
    const parsed = parseCapture('t,v\n0,1\n1,2\n', { timeOffset: -0.5 });
    const mapped = mapCapture(parsed, {
      time: { column: 0, unit: 'ms' },
      channels: [{ column: 1, quantity: 'busVoltage', unit: 'V' }],
    });
    expect(Array.from(mapped.time)).toEqual([-0.5e-3, 0.5e-3]);
  });

  it.each<[string, unknown, string, RegExp]>([
    [
      'a current in volts',
      { time: { column: 0, unit: 's' }, channels: [{ column: 2, quantity: 'current', unit: 'V' }] },
      'channels.0.unit',
      /A, mA or kA/,
    ],
    [
      'a voltage in amperes',
      { time: { column: 0, unit: 's' }, channels: [{ column: 1, quantity: 'busVoltage', unit: 'mA' }] },
      'channels.0.unit',
      /V, mV or kV/,
    ],
    [
      'an unknown time unit',
      { time: { column: 0, unit: 'min' }, channels: [{ column: 1, quantity: 'busVoltage', unit: 'V' }] },
      'time.unit',
      /"s", "ms", "us" or "ns"/,
    ],
    [
      'an unknown quantity',
      { time: { column: 0, unit: 's' }, channels: [{ column: 1, quantity: 'power', unit: 'V' }] },
      'channels.0.quantity',
      /capacitorVoltage/,
    ],
    [
      'a column that is not there',
      { time: { column: 0, unit: 's' }, channels: [{ column: 9, quantity: 'busVoltage', unit: 'V' }] },
      'channels.0.column',
      /no column 9/,
    ],
    [
      'the time column as a channel',
      { time: { column: 0, unit: 's' }, channels: [{ column: 0, quantity: 'busVoltage', unit: 'V' }] },
      'channels.0.column',
      /time column/,
    ],
    [
      'one column mapped twice',
      {
        time: { column: 0, unit: 's' },
        channels: [
          { column: 1, quantity: 'busVoltage', unit: 'V' },
          { column: 1, quantity: 'capacitorVoltage', unit: 'V' },
        ],
      },
      'channels.1.column',
      /already channel 0/,
    ],
    ['no channels', { time: { column: 0, unit: 's' }, channels: [] }, 'channels', /at least one channel/],
    [
      'a zero scale',
      { time: { column: 0, unit: 's' }, channels: [{ column: 1, quantity: 'busVoltage', unit: 'V', scale: 0 }] },
      'channels.0.scale',
      /other than 0/,
    ],
    [
      'a fractional column',
      { time: { column: 0.5, unit: 's' }, channels: [{ column: 1, quantity: 'busVoltage', unit: 'V' }] },
      'time.column',
      /whole column/,
    ],
    [
      'an unknown field',
      { time: { column: 0, unit: 's' }, channels: [{ column: 1, quantity: 'busVoltage', unit: 'V', gain: 2 }] },
      'channels.0',
      /gain/,
    ],
  ])('names the field for %s', (_label, mapping, path, message) => {
    const issues = issuesOf(() => mapCapture(scope, mapping as never));
    const issue = issues.find((candidate) => candidate.path === path);
    expect(issue).toBeDefined();
    expect(issue?.message).toMatch(message);
  });

  it('checks a time column other than the parsed one for increasing values, with the file line', () => {
    // Column 3 (9, 8, 7, 6) falls: mapping it as time is refused at the second data row, line 3.
    try {
      mapCapture(scope, { time: { column: 3, unit: 's' }, channels: [{ column: 1, quantity: 'busVoltage', unit: 'mV' }] });
      throw new Error('accepted');
    } catch (error) {
      expect(error).toBeInstanceOf(CaptureError);
      expect((error as CaptureError).code).toBe('non-monotonic-time');
      expect((error as CaptureError).line).toBe(3);
    }
  });
});

describe('decimate', () => {
  it('keeps every channel’s extremes, the first and the last sample, within maxPoints', () => {
    const n = 100_000;
    const time = Array.from({ length: n }, (_, k) => k * 1e-6);
    const v = time.map((_, k) => Math.sin(k / 5000));
    const i = time.map(() => 0);
    v[31_337] = 5; // a narrow spike on one channel
    i[77_777] = -3; // and a dip on the other
    const result = decimate(capture(time, v, i), 2000);
    expect(result.time.length).toBeLessThanOrEqual(2000);
    expect(result.time.length).toBeGreaterThan(1000);
    expect(Math.max(...result.channels[0].values)).toBe(5);
    expect(Math.min(...result.channels[1].values)).toBe(-3);
    expect(result.time[0]).toBe(0);
    expect(result.time[result.time.length - 1]).toBe(time[n - 1]);
    // Every kept point is a real sample: the channels stay in step.
    const at = Array.from(result.time).indexOf(31_337e-6);
    expect(at).toBeGreaterThan(-1);
    expect(result.channels[1].values[at]).toBe(0);
    // Still increasing.
    for (let k = 1; k < result.time.length; k++) expect(result.time[k]).toBeGreaterThan(result.time[k - 1]);
  });

  it('returns a short capture as it is', () => {
    const short = capture([0, 1, 2], [1, 2, 3]);
    expect(decimate(short)).toBe(short);
  });
});

describe('alignment and resampling', () => {
  const ramp = capture([0, 1, 2, 3], [0, 10, 20, 30]);

  it('alignCapture moves the capture in time and remembers the total shift', () => {
    const later = alignCapture(alignCapture(ramp, 0.5), 0.25);
    expect(Array.from(later.time)).toEqual([0.75, 1.75, 2.75, 3.75]);
    expect(later.alignment).toBe(0.75);
    expect(Array.from(ramp.time)).toEqual([0, 1, 2, 3]); // the original is untouched
  });

  it('resampleOnto interpolates linearly and gives NaN outside the capture', () => {
    const [values] = resampleOnto(ramp, [-1, 0, 0.25, 1.5, 3, 3.5]);
    expect(Array.from(values)).toEqual([NaN, 0, 2.5, 15, 30, NaN]);
  });

  it('interpolate copes with instants that go backwards', () => {
    expect(Array.from(interpolate([0, 1, 2], [0, 1, 4], [1.5, 0.5, 2]))).toEqual([2.5, 0.5, 4]);
  });
});

describe('captureResidual', () => {
  const t = Array.from({ length: 101 }, (_, k) => k * 1e-3);
  const simulated = { t, vC: t.map((x) => 100 * x), v: t.map((x) => 100 * x + 1), i: t.map(() => 2) };

  it('is the RMS and largest error where the two overlap', () => {
    // Measured 0.5 V above the simulated bus voltage, and one sample 3 V off.
    const times = Array.from({ length: 51 }, (_, k) => 0.05 + k * 2e-3); // 0.05 … 0.15 s: half overlaps
    const values = times.map((x) => 100 * x + 1 + 0.5);
    values[10] += 2.5;
    const measured: Capture = {
      time: Float64Array.from(times),
      channels: [{ column: 1, name: 'bus', quantity: 'busVoltage', unit: 'V', values: Float64Array.from(values) }],
      alignment: 0,
    };
    const residual = captureResidual(measured, simulated, 'busVoltage');
    expect(residual.count).toBe(26); // 0.05 … 0.10 s
    expect(residual.max).toBeCloseTo(3, 9);
    expect(residual.maxTime).toBeCloseTo(0.07, 12);
    expect(residual.rms).toBeCloseTo(Math.sqrt((25 * 0.25 + 9) / 26), 9);
    expect(residual.overlap?.[0]).toBeCloseTo(0.05, 12);
    expect(residual.overlap?.[1]).toBeCloseTo(0.1, 12);
  });

  it('applies the offset before comparing, and reports no overlap as NaN', () => {
    const measured: Capture = {
      time: Float64Array.from([0, 0.01, 0.02]),
      channels: [{ column: 1, name: 'i', quantity: 'current', unit: 'A', values: Float64Array.from([2, 2, 2]) }],
      alignment: 0,
    };
    expect(captureResidual(measured, simulated, 'current', 0.05).rms).toBe(0);
    const none = captureResidual(measured, simulated, 'current', 1);
    expect(none.count).toBe(0);
    expect(none.rms).toBeNaN();
    expect(() => captureResidual(measured, simulated, 'busVoltage')).toThrow(/no busVoltage channel/);
  });
});
