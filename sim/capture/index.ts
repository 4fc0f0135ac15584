// Bench captures: parsing scope and logger exports, mapping columns, decimation and alignment.
// See README.md in this folder.
export { CaptureError, type CaptureErrorCode } from './errors';
export { DEFAULT_MAX_BYTES } from './bytes';
export type { Delimiter } from './detect';
export type { DecimalMark } from './numbers';
export { parseCapture, type CaptureColumn, type ParseCaptureOptions, type ParsedCapture } from './parse';
export {
  CAPTURE_QUANTITIES,
  captureMappingSchema,
  channelOf,
  mapCapture,
  type Capture,
  type CaptureChannel,
  type CaptureMapping,
  type CaptureQuantity,
  type ChannelUnit,
  type TimeUnit,
} from './map';
export { averageBins, decimate } from './decimate';
export {
  alignCapture,
  captureResidual,
  interpolate,
  resampleOnto,
  simulatedSeries,
  type CaptureResidual,
  type SimulatedWaveform,
} from './align';
