/**
 * Cell errors: what a cell function reports when it cannot give a number.
 * The core throws plain `MixgapError`s (no cells there); the functions layer turns them into
 * `CellFailure`s with the spreadsheet error code that fits, and each host maps a `CellFailure`
 * onto its own error object (Excel: CustomFunctions.Error; the embedded engine: CellError).
 */

/** The spreadsheet error codes Mixgap uses. */
export type CellErrorCode = '#N/A' | '#NUM!' | '#VALUE!';

/** A cell-level failure: an Excel error code plus a message that says what to fix. */
export class CellFailure extends Error {
  readonly code: CellErrorCode;
  constructor(code: CellErrorCode, message: string) {
    super(message);
    this.name = 'CellFailure';
    this.code = code;
  }
}

/** One cell of a spilled result: a number, a text, or an error in that cell only. */
export type Cell = number | string | CellFailure;

const officeCode: Record<CellErrorCode, string> = {
  '#N/A': 'notAvailable',
  '#NUM!': 'invalidNumber',
  '#VALUE!': 'invalidValue',
};

/**
 * Turns a CellFailure into the error object of the host that runs us: inside Excel
 * (`CustomFunctions` present) a `CustomFunctions.Error`, elsewhere the CellFailure itself.
 */
export function toHostError(failure: CellFailure): unknown {
  const runtime = (globalThis as { CustomFunctions?: any }).CustomFunctions;
  if (runtime?.Error && runtime?.ErrorCode) {
    return new runtime.Error(runtime.ErrorCode[officeCode[failure.code]], failure.message);
  }
  return failure;
}
