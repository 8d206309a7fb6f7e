/** leverFractions against the spec's lever rule. */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Gap } from '../../src/core/binodal';
import { leverFractions, phaseFractions } from '../../src/core/leverRule';
import { pointAt } from '../../src/core/model';

const gapOf = (x1: number, x2: number): Gap => ({
  low: pointAt(Math.log(x1 / (1 - x1))), high: pointAt(Math.log(x2 / (1 - x2))), slope: 0,
});

describe('lever rule', () => {
  it("f'' = (x0 - x')/(x'' - x') inside the gap", () => {
    // Porter, Easterling & Sherif (2009) ch. 1 and the spec: the B-rich phase has fraction (x0 - x')/(x'' - x')
    const gap = gapOf(0.2, 0.7);
    const f = leverFractions(0.45, gap);
    // (0.45 - 0.2)/(0.7 - 0.2) = 0.5; the boundaries round-trip through u to a few ulps: 1e-14
    expect(f.high).toBeCloseTo(0.5, 14);
    expect(f.low).toBeCloseTo(0.5, 14);
    expect(leverFractions(0.3, gap).high).toBeCloseTo(0.2, 14);
  });

  it('one phase outside the gap: all A-rich below it, all B-rich above it', () => {
    // spec: outside a gap the material is one phase
    const gap = gapOf(0.2, 0.7);
    expect(leverFractions(0.1, gap)).toEqual({ low: 1, high: 0 });
    expect(leverFractions(0.9, gap)).toEqual({ low: 0, high: 1 });
  });

  it('fractions in [0, 1], summing to 1, balancing the mass (fast-check)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 1e-12, max: 1 - 1e-12, noNaN: true }), fc.double({ min: 1e-12, max: 1 - 1e-12, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (a, b, t) => {
          fc.pre(Math.abs(a - b) > 1e-9);
          const gap = gapOf(Math.min(a, b), Math.max(a, b));
          const x0 = gap.low.x + t * (gap.high.x - gap.low.x);
          const f = leverFractions(x0, gap);
          expect(f.low).toBeGreaterThanOrEqual(0);
          expect(f.high).toBeGreaterThanOrEqual(0);
          expect(f.low).toBeLessThanOrEqual(1);
          expect(f.high).toBeLessThanOrEqual(1);
          // 1 - f'' rounds by at most half an ulp of 1
          expect(Math.abs(f.low + f.high - 1)).toBeLessThanOrEqual(Number.EPSILON);
          // f' x' + f'' x'' = x0 to a few ulps of 1
          expect(Math.abs(f.low * gap.low.x + f.high * gap.high.x - x0)).toBeLessThan(4 * Number.EPSILON);
        },
      ),
      { seed: 7, numRuns: 2000 },
    );
  });
});

describe('phase fractions with several gaps or none', () => {
  // Outside every gap the material is one phase (spec); which one PHASEFRAC calls it is the rule
  // its documentation states (README, PHASEFRAC): the side of the nearest gap, or x0 <= 1/2 with no
  // gap (a naming convention of ours, no published source).
  const gaps = [gapOf(0.1, 0.3), gapOf(0.6, 0.8)];

  it('inside a gap: the lever rule of that gap', () => {
    expect(phaseFractions(0.2, gaps)).toEqual(leverFractions(0.2, gaps[0]));
    expect(phaseFractions(0.7, gaps)).toEqual(leverFractions(0.7, gaps[1]));
  });

  it('between two gaps: named after the nearer one', () => {
    expect(phaseFractions(0.35, gaps)).toEqual({ low: 0, high: 1 }); // above the first gap, 0.05 from it
    expect(phaseFractions(0.55, gaps)).toEqual({ low: 1, high: 0 }); // below the second gap, 0.05 from it
    expect(phaseFractions(0.05, gaps)).toEqual({ low: 1, high: 0 });
    expect(phaseFractions(0.95, gaps)).toEqual({ low: 0, high: 1 });
  });

  it('no gap: "low" up to x0 = 1/2, "high" above', () => {
    expect(phaseFractions(0.5, [])).toEqual({ low: 1, high: 0 });
    expect(phaseFractions(0.5000001, [])).toEqual({ low: 0, high: 1 });
  });
});
