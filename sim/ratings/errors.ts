import { DesignError, type DesignIssue } from '../errors';

/** Invalid policy or sizing input: the engine's own error type, so the API maps it to a 400 with fields. */
export function invalidInput(issues: DesignIssue[]): DesignError {
  return new DesignError(issues);
}
