import { expect } from 'vitest';
import { MixgapError } from '../../../src/core/errors';

/**
 * The core's value of one derivative against the symbolic reference. The reference is exact to
 * far more digits than a double; what remains is the core's own rounding, a few units of 2.2e-16
 * of the larger of the ideal and excess parts (the two can cancel, near a spinodal for g''), or of
 * the size of the model's coefficients (`floor`, J/mol) where both parts vanish (g' at x = 1/2 of
 * a symmetric model).
 */
export function expectDerivative(
  got: number, want: { value: number; ideal: number; excess: number }, rel: number, floor: number, what: string,
): void {
  const scale = Math.abs(want.ideal) + Math.abs(want.excess) + floor;
  const err = Math.abs(got - want.value);
  if (!(err <= rel * scale)) {
    expect.fail(`${what}: got ${got}, want ${want.value} (error ${err.toExponential(2)}, allowed ${(rel * scale).toExponential(2)})`);
  }
}

/** y = 1 - x as the core expects it: exact for x >= 1/2 (Sterbenz), correctly rounded below. */
export const yOf = (x: number) => 1 - x;

/** The reason of the MixgapError that f throws, or a text saying what happened instead. */
export function failureReason(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    return e instanceof MixgapError ? e.reason : `not a MixgapError: ${String(e)}`;
  }
  return 'no error';
}
