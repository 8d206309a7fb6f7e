/**
 * The least-squares engine on its own (src/core/fit/levenbergMarquardt.ts): a certified nonlinear
 * regression problem, and the named failures.
 */
import { describe, expect, it } from 'vitest';
import { MixgapError } from '../../../src/core/errors';
import { inverseNormal, levenbergMarquardt, type LeastSquaresProblem } from '../../../src/core/fit/levenbergMarquardt';

function reason(f: () => unknown): string {
  try { f(); } catch (e) { return e instanceof MixgapError ? `${e.reason}: ${e.message}` : `other: ${String(e)}`; }
  return 'no error';
}

describe('NIST StRD nonlinear regression, Misra1a (y = b1 (1 - exp(-b2 x)), 14 observations)', () => {
  // NIST Statistical Reference Datasets, nonlinear regression, Misra1a (Misra, NIST 1978):
  // data, starting values and certified values as published by NIST.
  const x = [77.6, 114.9, 141.1, 190.8, 239.9, 289.0, 332.8, 378.4, 434.8, 477.3, 536.8, 593.1, 689.1, 760.0];
  const y = [10.07, 14.73, 17.94, 23.93, 29.61, 35.18, 40.02, 44.82, 50.76, 55.05, 61.01, 66.40, 75.47, 81.78];
  const certified = { b: [2.3894212918e2, 5.5015643181e-4], se: [2.7070075241, 7.2668688436e-6], S: 1.2455138894e-1 };
  const problem: LeastSquaresProblem = {
    names: ['b1', 'b2'],
    units: [100, 1e-4],
    residuals: ([b1, b2]) => x.map((xi, i) => b1 * (1 - Math.exp(-b2 * xi)) - y[i]),
  };
  for (const start of [[500, 1e-4], [250, 5e-4]]) {
    it(`from NIST's start ${start.join(', ')}`, () => {
      const s = levenbergMarquardt(problem, start);
      // the certified values carry 11 digits; the fit stops at steps below 1e-10 of a parameter
      // and the Jacobian is good to ~1e-8: 1e-7 relative on the parameters and S leaves margin
      s.theta.forEach((b, j) => expect(Math.abs(b / certified.b[j] - 1), `b${j + 1}`).toBeLessThan(1e-7));
      expect(Math.abs(s.S / certified.S - 1)).toBeLessThan(1e-7);
      // standard errors sqrt(s^2 (J^T J)^-1_jj), s^2 = S/(n - p): the finite-difference Jacobian's
      // 1e-8 gives them to ~1e-8; 1e-6 relative
      const C = inverseNormal(s.J);
      const s2 = s.S / (x.length - 2);
      C.forEach((row, j) => expect(Math.abs(Math.sqrt(s2 * row[j]) / certified.se[j] - 1), `se of b${j + 1}`).toBeLessThan(1e-6));
    });
  }
});

describe('failures name the parameter and the reason', () => {
  it('no minimum (S -> 0 only as theta -> infinity): does not converge, says along which parameter', () => {
    const problem: LeastSquaresProblem = { names: ['k'], units: [1], residuals: ([k]) => [Math.exp(-k), 2 * Math.exp(-k)] };
    expect(reason(() => levenbergMarquardt(problem, [0]))).toMatch(/^convergence: the fit did not converge in \d+ iterations \(still moving along k\)/);
  });
  it('a parameter no residual depends on', () => {
    const problem: LeastSquaresProblem = { names: ['a', 'b'], units: [1, 1], residuals: ([a]) => [a - 1, a - 2, a - 3] };
    expect(reason(() => levenbergMarquardt(problem, [0, 0]))).toMatch(/^input: parameter b is not determined: no measurement depends on it/);
  });
  it('two parameters that only enter as their sum', () => {
    const problem: LeastSquaresProblem = { names: ['a', 'b'], units: [1, 1], residuals: ([a, b]) => [1, 2, 3].map((t) => (a + b) * t - 2 * t) };
    expect(reason(() => levenbergMarquardt(problem, [0, 0]))).toMatch(/^input: the data cannot tell (a and b|b and a) apart/);
  });
  it('residuals that cannot be computed at the start', () => {
    const problem: LeastSquaresProblem = {
      names: ['a'], units: [1],
      residuals: ([a]) => { if (a < 1) throw new MixgapError('none', 'no gap'); return [a - 2]; },
    };
    expect(reason(() => levenbergMarquardt(problem, [0]))).toMatch(/^none: the starting parameters give no model/);
  });
});
