/**
 * Flory–Huggins model: g, g', g'', g''' against the spec's formula differentiated symbolically by
 * mathjs and evaluated in 36-digit decimals.
 */
import { describe, expect, it } from 'vitest';
import { floryHuggins, chiAt } from '../../../src/core/models/floryHuggins';
import { expectModelMatches, failureReason } from '../support/compare';
import { R_SPEC, fhG, fhText, type FhParams } from '../support/spec';
import { reference } from '../support/symbolic';

const XS = [1e-6, 0.01, 0.2, 0.5, 0.73, 0.99, 1 - 1e-6];
const TS = [250, 420, 900];

const SETS: Array<{ name: string; p: FhParams }> = [
  { name: 'monomers (N = 1): a regular solution', p: { NA: 1, NB: 1, A: 0.5, B: 300 } },
  { name: 'polymer B in solvent A', p: { NA: 1, NB: 1000, A: 0.2, B: 150 } },
  { name: 'asymmetric blend', p: { NA: 50, NB: 200, A: -0.01, B: 5 } },
  { name: 'chi falling with T (B < 0), non-integer N', p: { NA: 3.5, NB: 1, A: 0.8, B: -100 } },
];

/** RT(1 + |chi|), J/mol: the scale of rounding where g and its derivatives vanish. */
const floorOf = (p: FhParams, T: number) => R_SPEC * T * (1 + Math.abs(p.A + p.B / T));

// As for Redlich–Kister (see redlichKister.test.ts): the core rounds at a few 2.2e-16 of the
// parts of g; y = 1 - x rounded for x < 1/2 gives up to ~4e-12 relative on g at x = 1e-6.
const REL = 1e-10;

describe('Flory–Huggins g and its derivatives against symbolic differentiation', () => {
  for (const { name, p } of SETS) {
    it(name, () => {
      const ref = reference(fhText(p));
      const model = floryHuggins(p);
      expectModelMatches(name, model, ref, TS, XS, REL, (T) => floorOf(p, T), 'phi', (T, x, y) => fhG(p, T, x, y));
    });
  }

  it('chi(T) = A + B/T', () => {
    // the spec's definition, evaluated directly
    expect(chiAt({ A: 0.2, B: 150 }, 300)).toBeCloseTo(0.7, 15);
    expect(chiAt({ A: 0.8, B: -100 }, 400)).toBeCloseTo(0.55, 15);
  });

  it('refuses chain lengths below 1 and non-finite chi terms', () => {
    expect(failureReason(() => floryHuggins({ NA: 0.5, NB: 1, A: 0, B: 0 }))).toBe('input');
    expect(failureReason(() => floryHuggins({ NA: 1, NB: NaN, A: 0, B: 0 }))).toBe('input');
    expect(failureReason(() => floryHuggins({ NA: 1, NB: 1, A: Infinity, B: 0 }))).toBe('input');
  });
});
