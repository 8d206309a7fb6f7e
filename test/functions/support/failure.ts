import { CellFailure } from '../../../src/functions/errors';

/** The CellFailure a call throws (in Node the cell functions throw one); anything else fails the test. */
export function failure(call: () => unknown): CellFailure {
  try {
    call();
  } catch (e) {
    if (e instanceof CellFailure) return e;
    throw e;
  }
  throw new Error('no failure: the call returned a value');
}
