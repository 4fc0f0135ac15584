/**
 * `mapCapture`: the user's column mapping (which column is time, which are channels, in what units)
 * applied to a parsed file, giving a `Capture` in SI units (s, V, A).
 */
import { z } from 'zod';

import { DesignError, type DesignIssue } from '../errors';
import { nonMonotonicError, type ParsedCapture } from './parse';

export const CAPTURE_QUANTITIES = ['capacitorVoltage', 'busVoltage', 'current'] as const;
export type CaptureQuantity = (typeof CAPTURE_QUANTITIES)[number];

const TIME_FACTORS = { s: 1, ms: 1e-3, us: 1e-6, ns: 1e-9 } as const;
const CHANNEL_FACTORS = { V: 1, mV: 1e-3, kV: 1e3, A: 1, mA: 1e-3, kA: 1e3 } as const;
const VOLTAGE_UNITS = ['V', 'mV', 'kV'];

export type TimeUnit = keyof typeof TIME_FACTORS;
export type ChannelUnit = keyof typeof CHANNEL_FACTORS;

const columnIndex = z
  .number({ error: 'must be a column number' })
  .int({ error: 'must be a whole column number' })
  .min(0, { error: 'must be 0 or more' });

export const captureMappingSchema = z.strictObject({
  time: z.strictObject({
    column: columnIndex,
    unit: z.enum(['s', 'ms', 'us', 'ns'], { error: 'must be "s", "ms", "us" or "ns"' }),
  }),
  channels: z
    .array(
      z
        .strictObject({
          column: columnIndex,
          quantity: z.enum(CAPTURE_QUANTITIES, { error: 'must be "capacitorVoltage", "busVoltage" or "current"' }),
          unit: z.enum(['V', 'mV', 'kV', 'A', 'mA', 'kA'], { error: 'must be one of V, mV, kV, A, mA, kA' }),
          /** Probe or shunt factor the recorded numbers are multiplied by (a 10:1 probe recorded at 1:1 is 10). */
          scale: z
            .number({ error: 'must be a number' })
            .refine((value) => Number.isFinite(value) && value !== 0, { error: 'must be a finite number other than 0' })
            .optional(),
          name: z.string({ error: 'must be a string' }).optional(),
        })
        .superRefine((channel, ctx) => {
          const isVoltage = VOLTAGE_UNITS.includes(channel.unit);
          if (channel.quantity === 'current' && isVoltage) {
            ctx.addIssue({ code: 'custom', path: ['unit'], message: 'a current is in A, mA or kA' });
          } else if (channel.quantity !== 'current' && !isVoltage) {
            ctx.addIssue({ code: 'custom', path: ['unit'], message: 'a voltage is in V, mV or kV' });
          }
        }),
      { error: 'must be a list of channels' },
    )
    .min(1, { error: 'map at least one channel' }),
});

export type CaptureMapping = z.input<typeof captureMappingSchema>;

export interface CaptureChannel {
  /** Column index in the file. */
  column: number;
  name: string;
  quantity: CaptureQuantity;
  /** SI unit of `values`. */
  unit: 'V' | 'A';
  values: Float64Array;
}

/** A bench capture in SI units on one increasing time axis. */
export interface Capture {
  /** Seconds, increasing strictly; includes the file's time offset and any alignment. */
  time: Float64Array;
  channels: CaptureChannel[];
  /** Seconds added by alignCapture so far (0 for a fresh capture). */
  alignment: number;
}

function issuesOf(error: z.ZodError): DesignIssue[] {
  return error.issues.map((issue) => ({ path: issue.path.map(String).join('.'), message: issue.message }));
}

/** Applies a column mapping. Throws DesignError with field paths ("channels.0.unit") for a bad mapping. */
export function mapCapture(parsed: ParsedCapture, mapping: CaptureMapping): Capture {
  const result = captureMappingSchema.safeParse(mapping);
  if (!result.success) throw new DesignError(issuesOf(result.error));
  const map = result.data;
  const width = parsed.columns.length;
  const issues: DesignIssue[] = [];
  const exists = (column: number, path: string) => {
    if (column >= width) issues.push({ path, message: `the file has columns 0 to ${width - 1}; there is no column ${column}` });
  };
  exists(map.time.column, 'time.column');
  const seen = new Map<number, number>();
  map.channels.forEach((channel, k) => {
    exists(channel.column, `channels.${k}.column`);
    if (channel.column === map.time.column) issues.push({ path: `channels.${k}.column`, message: 'is the time column' });
    const earlier = seen.get(channel.column);
    if (earlier !== undefined)
      issues.push({ path: `channels.${k}.column`, message: `column ${channel.column} is already channel ${earlier}` });
    seen.set(channel.column, k);
  });
  if (issues.length) throw new DesignError(issues);

  const raw = parsed.values[map.time.column];
  if (map.time.column !== parsed.timeColumn) {
    // parseCapture checked its own time column; this one is checked here, with the file's lines.
    for (let k = 1; k < raw.length; k++) {
      if (!(raw[k] > raw[k - 1]))
        throw nonMonotonicError(parsed.rowLines[k], parsed.rowLines[k - 1], String(raw[k]), String(raw[k - 1]));
    }
  }
  const timeFactor = TIME_FACTORS[map.time.unit];
  const time = raw.map((t) => (t + parsed.timeOffset) * timeFactor);
  const channels = map.channels.map((channel): CaptureChannel => {
    const factor = CHANNEL_FACTORS[channel.unit] * (channel.scale ?? 1);
    return {
      column: channel.column,
      name: channel.name ?? parsed.columns[channel.column].name,
      quantity: channel.quantity,
      unit: channel.quantity === 'current' ? 'A' : 'V',
      values: parsed.values[channel.column].map((x) => x * factor),
    };
  });
  return { time, channels, alignment: 0 };
}

/** The first channel of a quantity, or null. */
export function channelOf(capture: Capture, quantity: CaptureQuantity): CaptureChannel | null {
  return capture.channels.find((channel) => channel.quantity === quantity) ?? null;
}
