/** One problem with a design, named by the field it came from ("capacitor.capacitance"). */
export interface DesignIssue {
  path: string;
  message: string;
}

/**
 * Invalid input. The engine throws only this (and only for input it cannot run); numerical trouble
 * comes back inside the result as warnings and solver outcomes instead.
 */
export class DesignError extends Error {
  readonly issues: DesignIssue[];

  constructor(issues: DesignIssue[] | string, path = '') {
    const list = typeof issues === 'string' ? [{ path, message: issues }] : issues;
    super(list.map((issue) => (issue.path ? `${issue.path}: ${issue.message}` : issue.message)).join('; '));
    this.name = 'DesignError';
    this.issues = list;
  }
}
