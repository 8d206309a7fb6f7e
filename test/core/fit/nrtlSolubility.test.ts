/** NRTL taus from one pair of mutual solubilities: round trip through the core's binodal solver. */
import { describe, expect, it } from 'vitest';
import { phaseMap } from '../../../src/core/binodal';
import { MixgapError } from '../../../src/core/errors';
import { fitNrtlSolubilities } from '../../../src/core/fit/nrtlSolubility';
import { nrtl } from '../../../src/core/models/nrtl';

describe('taus -> gap (binodal solver) -> taus', () => {
  // Newton stops at |F| <= 1e-12 (in ln activity); the Jacobian is O(1), so the taus come back
  // to ~1e-11, and the gap compositions are rounded at 1e-16: 1e-9 leaves a wide margin.
  const cases: Array<[number, number, number, number]> = [
    [1.5, 2.5, 0.2, 300], [3.5, 0.5, 0.3, 350], [-0.5, 4, 0.3, 300], [6, -1, 0.2, 300],
  ];
  for (const [tau12, tau21, alpha, T] of cases) {
    it(`tau12 = ${tau12}, tau21 = ${tau21}, alpha = ${alpha}`, () => {
      const [gap] = phaseMap(nrtl({ a12: tau12, b12: 0, a21: tau21, b21: 0, alpha }).at(T)).gaps;
      const fit = fitNrtlSolubilities(T, gap.low.x, gap.high.x, alpha);
      expect(Math.abs(fit.tau12 - tau12)).toBeLessThan(1e-9);
      expect(Math.abs(fit.tau21 - tau21)).toBeLessThan(1e-9);
    });
  }

  it('symmetric solubilities give equal taus', () => {
    // common practice, no published source: a symmetric gap (x'' = 1 - x') needs tau12 = tau21
    const fit = fitNrtlSolubilities(300, 0.001, 0.999, 0.2);
    expect(Math.abs(fit.tau12 - fit.tau21)).toBeLessThan(1e-9);
  });

  it('a gap no tau pair can produce at this alpha is an error, not a number', () => {
    // With alpha = 0.47 the NRTL model cannot make a narrow gap (0.2, 0.3) at 300 K.
    let error: unknown;
    try { fitNrtlSolubilities(300, 0.2, 0.3, 0.47); } catch (e) { error = e; }
    expect(error).toBeInstanceOf(MixgapError);
    expect((error as MixgapError).reason).toBe('convergence');
    expect((error as MixgapError).message).toMatch(/no pair of taus with alpha = 0.47 makes x' = 0.2 and x'' = 0.3 coexist/);
  });

  it('bad input is refused with what to fix', () => {
    expect(() => fitNrtlSolubilities(300, 0.6, 0.3, 0.3)).toThrow(/0 < x' < x'' < 1/);
    expect(() => fitNrtlSolubilities(300, 0.1, 0.9, 0)).toThrow(/alpha = 0/);
  });
});
