/** Why a fit could not be made from this capture (too few peaks, no overlap, …). */
export type FitErrorCode = 'too-few-samples' | 'too-few-peaks' | 'no-overlap' | 'no-channel' | 'bad-parameter';

export class FitError extends Error {
  readonly code: FitErrorCode;
  /** The option or design field at fault, when there is one ("params.0", "capacitor.capacitance"). */
  readonly path?: string;

  constructor(code: FitErrorCode, message: string, path?: string) {
    super(message);
    this.name = 'FitError';
    this.code = code;
    if (path !== undefined) this.path = path;
  }
}
