// The server's door to the engine's bench-capture, fit and parts modules (sim/capture, sim/fit,
// sim/parts), kept beside engine.ts so that the surface the server relies on is written down once.
// Typed arrays become plain number arrays here: everything returned is JSON-safe.
import {
  CaptureError,
  DEFAULT_MAX_BYTES,
  captureMappingSchema,
  decimate,
  mapCapture,
  parseCapture,
  type Capture,
  type CaptureMapping,
  type ParsedCapture,
} from '../../sim/capture';
import { FIT_PARAMS, FitError, fitCapture } from '../../sim/fit';
import {
  KIND_FIELDS,
  PART_KINDS,
  PART_SLOT_KEYS,
  PART_SLOTS,
  applyPartToDesign,
  demoParts,
  exportPartsCsv,
  importPartsCsv,
  partsCsvTemplate,
  ratingCitations,
  safeParsePart,
  type Part,
  type PartRefs,
  type PartSlot,
} from '../../sim/parts';
import { HttpError, type FieldError } from '../errors';

export { CaptureError, DEFAULT_MAX_BYTES as CAPTURE_MAX_BYTES, FIT_PARAMS, PART_KINDS, PART_SLOT_KEYS, PART_SLOTS, KIND_FIELDS };
export type { Part, PartRefs, PartSlot, CaptureMapping };

const jsonSafe = <T>(value: T): T => JSON.parse(JSON.stringify(value)) as T;

export interface ParseOptions {
  delimiter?: 'auto' | ',' | ';' | '\t';
  decimal?: 'auto' | '.' | ',';
  hasHeader?: 'auto' | boolean;
  timeOffset?: number;
}

function isDesignError(error: unknown): error is Error & { issues: { path: string; message: string }[] } {
  return error instanceof Error && error.name === 'DesignError' && Array.isArray((error as { issues?: unknown }).issues);
}

function fieldsError(status: number, code: string, lead: string, issues: { path: string; message: string }[], prefix = ''): HttpError {
  const fields: FieldError[] = issues.map((i) => ({ path: [prefix, i.path].filter(Boolean).join('.') || '(body)', message: i.message }));
  const first = fields[0];
  const more = fields.length > 1 ? ` (and ${fields.length - 1} more)` : '';
  return new HttpError(status, code, first ? `${lead}: ${first.path} ${first.message}${more}.` : `${lead}.`, fields);
}

/** Parses a capture file; CaptureError propagates (the route answers 400 with its line and column). */
export function parseCaptureFile(bytes: Uint8Array, options: ParseOptions): ParsedCapture {
  try {
    return parseCapture(bytes, { ...options, maxBytes: DEFAULT_MAX_BYTES });
  } catch (error) {
    if (isDesignError(error)) throw fieldsError(400, 'invalid_options', 'The parse options are not valid', error.issues, 'options');
    throw error;
  }
}

export interface CapturePreview {
  rows: number;
  delimiter: string;
  decimal: string;
  header: string[] | null;
  timeColumn: number;
  columns: { index: number; name: string; sample: number[] }[];
  preview: string[][];
  skippedLines: number[];
}

export function previewOf(parsed: ParsedCapture): CapturePreview {
  return jsonSafe({
    rows: parsed.rows,
    delimiter: parsed.delimiter,
    decimal: parsed.decimal,
    header: parsed.header,
    timeColumn: parsed.timeColumn,
    columns: parsed.columns.map((c) => ({ index: c.index, name: c.name, sample: c.sample })),
    preview: parsed.preview,
    skippedLines: parsed.skippedLines,
  });
}

/** Validates and applies a mapping; a bad one is a 400 naming the field ("mapping.channels.0.unit"). */
export function mapParsed(parsed: ParsedCapture, mapping: unknown): Capture {
  const checked = captureMappingSchema.safeParse(mapping);
  if (!checked.success)
    throw fieldsError(
      400,
      'invalid_mapping',
      'The column mapping is not valid',
      checked.error.issues.map((i) => ({ path: i.path.map(String).join('.'), message: i.message })),
      'mapping',
    );
  try {
    return mapCapture(parsed, checked.data);
  } catch (error) {
    if (isDesignError(error)) throw fieldsError(400, 'invalid_mapping', 'The column mapping is not valid', error.issues, 'mapping');
    throw error;
  }
}

export interface CaptureSeries {
  time: number[];
  alignment: number;
  channels: { column: number; name: string; quantity: string; unit: 'V' | 'A'; values: number[] }[];
}

export function seriesOf(capture: Capture): CaptureSeries {
  return jsonSafe({
    time: Array.from(capture.time),
    alignment: capture.alignment,
    channels: capture.channels.map((c) => ({ column: c.column, name: c.name, quantity: c.quantity, unit: c.unit, values: Array.from(c.values) })),
  });
}

export const decimateForChart = (capture: Capture): CaptureSeries => seriesOf(decimate(capture, 2000));

export interface FitRequest {
  quantity: 'capacitorVoltage' | 'busVoltage' | 'current';
  params?: string[];
  offset?: number;
  start?: number;
  end?: number;
  refine?: boolean;
}

/** Fits the design's values to a capture; FitError and an invalid design are 422s naming the field. */
export function fitDesignToCapture(capture: Capture, designInput: unknown, request: FitRequest) {
  try {
    const fit = fitCapture(capture, designInput as never, {
      quantity: request.quantity,
      params: request.params as never,
      offset: request.offset,
      start: request.start,
      end: request.end,
      refine: request.refine,
    });
    return jsonSafe({
      quantity: request.quantity,
      values: fit.values,
      estimate: fit.estimate,
      series: fit.series,
      ringing: {
        zeta: fit.ringing.zeta,
        fd: fit.ringing.fd,
        fn: fit.ringing.fn,
        finalValue: fit.ringing.finalValue,
        peaks: fit.ringing.peaks.length,
      },
      refined: fit.refined
        ? {
            converged: fit.refined.converged,
            iterations: fit.refined.iterations,
            residualRms: fit.refined.residualRms,
            initialResidualRms: fit.refined.initialResidualRms,
          }
        : null,
      residualRms: fit.residualRms,
      residualMax: fit.residualMax,
      apply: fit.apply,
    });
  } catch (error) {
    if (error instanceof FitError) {
      const path = (error as FitError & { path?: string }).path;
      throw new HttpError(422, `fit_${error.code}`, `The fit could not run: ${error.message}.`, path ? [{ path, message: error.message }] : undefined);
    }
    if (isDesignError(error)) throw fieldsError(422, 'invalid_design', 'The design is not valid', error.issues, 'design');
    throw error;
  }
}

// ---- parts ----

/** Validates a part; a bad one is a 400 naming the field. */
export function checkPart(input: unknown): Part {
  const result = safeParsePart(input);
  if (!result.ok) throw fieldsError(400, 'invalid_part', 'The part is not valid', result.issues);
  return result.part;
}

export const partsTemplate = (): string => partsCsvTemplate();
export const partsExport = (parts: Part[]): string => exportPartsCsv(parts, { bom: true });
export const partsImport = (input: string | Uint8Array, validOnly: boolean) => importPartsCsv(input, { validOnly });
export const demoPartList = (): Part[] => demoParts();
export const citationsFor = (refs: PartRefs, parts: Part[]) => jsonSafe(ratingCitations(refs, parts));

export function applyPart(designInput: unknown, slot: string, part: Part, refs: PartRefs) {
  try {
    return applyPartToDesign(designInput as never, slot as PartSlot, part, refs);
  } catch (error) {
    if (isDesignError(error)) throw fieldsError(422, 'part_does_not_fit', 'The part cannot go there', error.issues);
    throw error;
  }
}
