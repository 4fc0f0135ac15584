/**
 * Why a bench capture file was refused. The upload route maps it to a 400 whose message says what is
 * wrong and where (line and column, both 1-based, as a text editor counts them).
 */
export type CaptureErrorCode =
  | 'empty'
  | 'too-large'
  | 'binary'
  | 'no-numeric-rows'
  | 'too-few-columns'
  | 'mixed-column-counts'
  | 'non-numeric-cell'
  | 'non-monotonic-time';

export class CaptureError extends Error {
  readonly code: CaptureErrorCode;
  /** 1-based line in the file (after the BOM; CRLF, LF and CR each end one line). */
  readonly line?: number;
  /** 1-based column (field) number within that line. */
  readonly column?: number;

  constructor(code: CaptureErrorCode, message: string, where: { line?: number; column?: number } = {}) {
    super(message);
    this.name = 'CaptureError';
    this.code = code;
    if (where.line !== undefined) this.line = where.line;
    if (where.column !== undefined) this.column = where.column;
  }
}
