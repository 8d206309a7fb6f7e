/**
 * Failures of the thermodynamic core. The core knows nothing of cells: it says what went wrong
 * (`reason`) and the functions layer chooses the spreadsheet error that fits.
 */
export type FailureReason =
  /** The question has no answer for these inputs (no gap at this temperature, no critical point...). */
  | 'none'
  /** A number lies outside its valid range (x outside (0, 1), T <= 0, a gap number that does not exist). */
  | 'range'
  /** Input that cannot describe a system (malformed parameters). */
  | 'input'
  /** An iteration did not meet its tolerance: the answer would not be trustworthy. */
  | 'convergence';

export class MixgapError extends Error {
  readonly reason: FailureReason;
  constructor(reason: FailureReason, message: string) {
    super(message);
    this.name = 'MixgapError';
    this.reason = reason;
  }
}

export function fail(reason: FailureReason, message: string): never {
  throw new MixgapError(reason, message);
}
