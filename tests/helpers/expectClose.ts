/**
 * Numeric comparison for the engine's tests: passes when |actual − expected| ≤ max(relTol·|expected|, absTol).
 * The failure message gives both values and the relative error, so a failing check says how far off it is.
 */
export function expectClose(actual: number | null | undefined, expected: number, relTol: number, absTol = 0): void {
  if (typeof actual !== 'number' || !Number.isFinite(actual)) {
    throw new Error(`expected a finite number close to ${expected}, got ${String(actual)}`);
  }
  const error = Math.abs(actual - expected);
  const allowed = Math.max(relTol * Math.abs(expected), absTol);
  if (!(error <= allowed)) {
    const relative = expected !== 0 ? error / Math.abs(expected) : Infinity;
    throw new Error(
      `expected ${actual} to be within ${allowed.toExponential(2)} of ${expected} ` +
        `(off by ${error.toExponential(3)}, ${relative.toExponential(3)} relative; allowed ${relTol} relative, ${absTol} absolute)`,
    );
  }
}
