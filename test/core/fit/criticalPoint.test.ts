/** Coefficients from a measured critical point: closed form, and the model's own derivatives. */
import { describe, expect, it } from 'vitest';
import { MixgapError } from '../../../src/core/errors';
import { criticalPoints } from '../../../src/core/critical';
import { fitCriticalPoint } from '../../../src/core/fit/criticalPoint';
import { redlichKister } from '../../../src/core/models/redlichKister';

const R = 8.314462618; // CODATA 2018, exact (spec)

describe('critical point -> coefficients', () => {
  it('without xc: the regular solution with Omega = 2 R Tc', () => {
    // spec closed form: regular solution Tc = Omega / (2R), xc = 1/2
    const terms = fitCriticalPoint(600);
    expect(terms[0].a).toBeCloseTo(2 * R * 600, 9);
    expect(terms[1].a).toBe(0);
  });

  for (const [Tc, xc] of [[450, 0.3], [800, 0.65], [1200, 0.12]]) {
    it(`Tc = ${Tc} K, xc = ${xc}: g'' = g''' = 0 there, and the search finds it as an upper critical point`, () => {
      const terms = fitCriticalPoint(Tc, xc);
      const iso = redlichKister(terms).at(Tc);
      const y = 1 - xc;
      // The model's own derivatives (not the fit's basis functions): zero to rounding of the
      // ideal part RT/(xy) (g'') and RT/x^2 (g'''), 1e-12 of it.
      expect(Math.abs(iso.d2g(xc, y))).toBeLessThan(1e-12 * (R * Tc) / (xc * y));
      expect(Math.abs(iso.d3g(xc, y))).toBeLessThan(1e-12 * (R * Tc) / Math.min(xc, y) ** 2);
      const [point] = criticalPoints(redlichKister(terms));
      expect(point.kind).toBe('upper');
      // the search converges to 1e-13 Tc in T and its minimiser to ~1e-8 in x
      expect(Math.abs(point.T - Tc)).toBeLessThan(1e-9 * Tc);
      expect(Math.abs(point.x - xc)).toBeLessThan(1e-7);
    });
  }

  it('Tc outside the searched 1 K to 20000 K is refused', () => {
    expect(() => fitCriticalPoint(25000, 0.4)).toThrow(MixgapError);
    expect(() => fitCriticalPoint(25000, 0.4)).toThrow(/must lie between 1 K and 20000 K/);
    expect(() => fitCriticalPoint(500, 1)).toThrow(/strictly between 0 and 1/);
  });
});
