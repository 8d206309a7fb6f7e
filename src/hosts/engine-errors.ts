/**
 * Error translation between the cell functions and the engine: a CellFailure (thrown or returned)
 * becomes the engine's error with its message, anything else that goes wrong becomes #VALUE!
 * "internal error in ...", and a non-finite number becomes #NUM!.
 */
import { CellError, EmptyValue, ErrorType } from 'hyperformula';
import { CellFailure } from '../functions/errors';

/** One cell as the engine holds it. */
export type EngineCellValue = number | string | boolean | CellError | typeof EmptyValue;

const errorTypeOf: Record<string, ErrorType> = {
  '#N/A': ErrorType.NA,
  '#NUM!': ErrorType.NUM,
  '#VALUE!': ErrorType.VALUE,
};

/** A CellFailure from src/functions/errors.ts (by class, or by shape should two copies be bundled). */
export function isCellFailure(x: unknown): x is CellFailure {
  if (x instanceof CellFailure) return true;
  const o = x as { name?: unknown; code?: unknown; message?: unknown } | null;
  return typeof o === 'object' && o !== null && o.name === 'CellFailure' && typeof o.code === 'string'
    && typeof o.message === 'string';
}

/** CellFailure -> the engine's error object, keeping the message that says what to fix. */
export function toCellError(failure: CellFailure): CellError {
  return new CellError(errorTypeOf[failure.code] ?? ErrorType.VALUE, failure.message);
}

/** #VALUE! "internal error in NAME: ..." for what should never happen. */
export function internalError(name: string, what: unknown): CellError {
  const text = what instanceof Error ? what.message : String(what);
  return new CellError(ErrorType.VALUE, `internal error in ${name}: ${text}`);
}

/** One returned cell -> engine value. */
export function toCellValue(name: string, v: unknown): EngineCellValue {
  if (typeof v === 'number') {
    return Number.isFinite(v) ? v : new CellError(ErrorType.NUM, `internal error in ${name}: result is ${v}`);
  }
  if (typeof v === 'string' || typeof v === 'boolean') return v;
  if (v === null || v === undefined) return EmptyValue;
  if (isCellFailure(v)) return toCellError(v);
  if (v instanceof CellError) return v;
  return internalError(name, `unexpected cell value of type ${typeof v}`);
}

/** A scalar result -> engine value (an array or a promise from a scalar function is an internal error). */
export function toScalar(name: string, result: unknown): unknown {
  if (Array.isArray(result)) return internalError(name, 'returned an array, but its metadata declares a scalar result');
  if (result instanceof Promise) return internalError(name, 'returned a promise: asynchronous functions are not supported by the embedded engine');
  return toCellValue(name, result);
}

/** Runs an implementation: what it throws becomes an error value. */
export function callSafely(name: string, run: () => unknown): { result: unknown } | { error: CellError } {
  try {
    return { result: run() };
  } catch (e) {
    return { error: isCellFailure(e) ? toCellError(e) : internalError(name, e) };
  }
}
