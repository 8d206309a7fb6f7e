import { expect } from 'vitest';
import { MixgapError } from '../../../src/core/errors';
import type { BinaryModel } from '../../../src/core/model';
import type { Reference } from './symbolic';

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

/**
 * g and its first three derivatives of `model` against the symbolic reference at every T and x
 * (and, when given, an independent evaluation `g` of the spec's formula against the same reference).
 */
export function expectModelMatches(
  name: string, model: BinaryModel, ref: Reference, Ts: readonly number[], xs: readonly number[],
  rel: number, floor: (T: number) => number, variable: string, g?: (T: number, x: number, y: number) => number,
): void {
  for (const T of Ts) {
    const iso = model.at(T);
    for (const x of xs) {
      const y = yOf(x);
      const got = [iso.g(x, y), iso.dg(x, y), iso.d2g(x, y), iso.d3g(x, y)];
      for (let k = 0; k <= 3; k++) {
        expectDerivative(got[k], ref.at(k, x, T), rel, floor(T), `${name}: d${k}g at ${variable} = ${x}, T = ${T}`);
      }
      if (g) expectDerivative(g(T, x, y), ref.at(0, x, T), rel, floor(T), `${name}: reference g at ${variable} = ${x}, T = ${T}`);
    }
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
