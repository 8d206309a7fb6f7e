/**
 * Redlich–Kister model: g, g', g'', g''' against the spec's formula differentiated symbolically by
 * mathjs and evaluated in 36-digit decimals.
 */
import { describe, expect, it } from 'vitest';
import { redlichKister, regularSolution } from '../../../src/core/models/redlichKister';
import { expectDerivative, expectModelMatches, failureReason, yOf } from '../support/compare';
import { R_SPEC, rkD2g, rkDg, rkG, rkL, rkText, type RkTerm } from '../support/spec';
import { reference } from '../support/symbolic';

// Compositions down to 1e-6 from either end and across the middle, at three temperatures.
const XS = [1e-6, 0.01, 0.2, 0.5, 0.73, 0.99, 1 - 1e-6];
const TS = [300, 850, 1700];

const SETS: Array<{ name: string; terms: RkTerm[] }> = [
  { name: 'regular solution', terms: [{ a: 20000, b: 0, c: 0 }] },
  { name: 'two terms with T slopes', terms: [{ a: -15000, b: 6.5, c: 0 }, { a: 8000, b: -2.25, c: 0 }] },
  {
    name: 'four terms with T and T ln T',
    terms: [
      { a: 25000, b: -12.3, c: 1.7 },
      { a: -6000, b: 4.1, c: -0.6 },
      { a: 3500, b: 0, c: 0.25 },
      { a: -1200, b: 0.8, c: -0.1 },
    ],
  },
  { name: 'odd terms only', terms: [{ a: 0, b: 0, c: 0 }, { a: 30000, b: -3, c: 0 }, { a: 0, b: 0, c: 0 }, { a: 9000, b: 0, c: -1.2 }] },
];

/** The size of g's coefficients at T (J/mol): the scale of rounding where g and its derivatives vanish. */
const floorOf = (terms: readonly RkTerm[], T: number) => R_SPEC * T + rkL(terms, T).reduce((s, L) => s + Math.abs(L), 0);

// Rounding allowance relative to the size of g's parts: the core rounds at a few 2.2e-16 per
// operation; the largest legitimate difference is g itself at x = 1e-6, where y = 1 - x rounded
// to a double moves y ln y by ~6e-17 RT against g ~ 1.5e-5 RT (4e-12 relative). 1e-10 leaves a
// margin of 25 over that, while a wrong coefficient or sign in any derivative gives errors of order 1.
const REL = 1e-10;

describe('Redlich–Kister g and its derivatives against symbolic differentiation', () => {
  for (const { name, terms } of SETS) {
    it(name, () => {
      const ref = reference(rkText(terms));
      const model = redlichKister(terms);
      expectModelMatches(name, model, ref, TS, XS, REL, (T) => floorOf(terms, T), 'x');
    });
  }

  it('the test reference formulas (support/spec.ts) agree with the symbolic ones', () => {
    // These double-precision formulas are what the binodal tests measure the core with.
    for (const { name, terms } of SETS) {
      const ref = reference(rkText(terms));
      for (const T of TS) {
        for (const x of XS) {
          const y = yOf(x), floor = floorOf(terms, T);
          expectDerivative(rkG(terms, T, x, y), ref.at(0, x, T), REL, floor, `${name}: rkG`);
          expectDerivative(rkDg(terms, T, x, y), ref.at(1, x, T), REL, floor, `${name}: rkDg`);
          expectDerivative(rkD2g(terms, T, x, y), ref.at(2, x, T), REL, floor, `${name}: rkD2g`);
        }
      }
    }
  });

  it('keeps full precision at x = 1 - 1e-12 when y is passed separately', () => {
    // x = 1 - 1e-12 is the double nearest; y = 1 - x is then exact, and g'' ~ RT/y must follow y.
    const terms = SETS[2].terms;
    const ref = reference(rkText(terms));
    const x = 1 - 1e-12, y = 1 - x;
    const iso = redlichKister(terms).at(850);
    expectDerivative(iso.dg(x, y), ref.at(1, x, 850), REL, floorOf(terms, 850), 'dg near x = 1');
    expectDerivative(iso.d2g(x, y), ref.at(2, x, 850), REL, floorOf(terms, 850), 'd2g near x = 1');
    expectDerivative(iso.d3g(x, y), ref.at(3, x, 850), REL, floorOf(terms, 850), 'd3g near x = 1');
  });

  it('regularSolution(Omega) is the one-term series L0 = Omega', () => {
    const terms = [{ a: 12345, b: 0, c: 0 }];
    const ref = reference(rkText(terms));
    const iso = regularSolution(12345).at(640);
    for (const x of XS) {
      const y = yOf(x);
      for (const [k, got] of [iso.g(x, y), iso.dg(x, y), iso.d2g(x, y), iso.d3g(x, y)].entries()) {
        expectDerivative(got, ref.at(k, x, 640), REL, floorOf(terms, 640), `d${k}g at ${x}`);
      }
    }
  });
});

describe('Redlich–Kister input', () => {
  it('refuses an empty series and non-finite coefficients', () => {
    expect(failureReason(() => redlichKister([]))).toBe('input');
    expect(failureReason(() => redlichKister([{ a: NaN, b: 0, c: 0 }]))).toBe('input');
    expect(failureReason(() => redlichKister([{ a: 1000, b: 0, c: Infinity }]))).toBe('input');
  });
});
