/**
 * "The input was wrong": a clear one-line message (what, where, how to fix) and
 * exit status 2. Anything else that escapes is an internal fault.
 */
export class UserError extends Error {
  readonly exitCode: number;
  constructor(message: string, exitCode = 2) {
    super(message);
    this.name = 'UserError';
    this.exitCode = exitCode;
  }
}

/** A syntax or meaning error in a typed expression, with the 1-based column it points at. */
export class ExpressionError extends UserError {
  readonly column: number | null;
  constructor(message: string, column: number | null = null) {
    super(column === null ? message : `${message} (at column ${column})`);
    this.name = 'ExpressionError';
    this.column = column;
  }
}
