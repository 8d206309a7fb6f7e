/**
 * NRTL model: g, g', g'', g''' against the spec's formula differentiated symbolically by mathjs
 * and evaluated in 36-digit decimals; activity coefficients against the published closed forms.
 */
import { describe, expect, it } from 'vitest';
import { muA, muB } from '../../../src/core/model';
import { nrtl } from '../../../src/core/models/nrtl';
import { expectModelMatches, failureReason } from '../support/compare';
import { R_SPEC, nrtlG, nrtlText, type NrtlParams } from '../support/spec';
import { reference } from '../support/symbolic';

const XS = [1e-6, 0.01, 0.2, 0.5, 0.73, 0.99, 1 - 1e-6];
const TS = [280, 350, 500];

const SETS: Array<{ name: string; p: NrtlParams }> = [
  { name: 'temperature-dependent taus', p: { a12: 0.5, b12: 400, a21: -0.2, b21: 250, alpha: 0.3 } },
  { name: 'constant taus, alpha = 0.2 (splits into two liquids)', p: { a12: 2.5, b12: 0, a21: 1.2, b21: 0, alpha: 0.2 } },
  { name: 'taus of opposite sign, alpha = 0.47', p: { a12: -1.1, b12: 600, a21: 3, b21: -300, alpha: 0.47 } },
];

const taus = (p: NrtlParams, T: number) => ({ tau12: p.a12 + p.b12 / T, tau21: p.a21 + p.b21 / T });

/** RT(1 + |tau12| + |tau21|), J/mol: the scale of rounding where g and its derivatives vanish. */
const floorOf = (p: NrtlParams, T: number) => {
  const { tau12, tau21 } = taus(p, T);
  return R_SPEC * T * (1 + Math.abs(tau12) + Math.abs(tau21));
};

// As for Redlich–Kister (see redlichKister.test.ts): the core rounds at a few 2.2e-16 of the
// parts of g; y = 1 - x rounded for x < 1/2 gives up to ~4e-12 relative on g at x = 1e-6.
const REL = 1e-10;

describe('NRTL g and its derivatives against symbolic differentiation', () => {
  for (const { name, p } of SETS) {
    it(name, () => {
      const ref = reference(nrtlText(p));
      const model = nrtl(p);
      expectModelMatches(name, model, ref, TS, XS, REL, (T) => floorOf(p, T), 'x', (T, x, y) => nrtlG(p, T, x, y));
    });
  }

  it('refuses alpha <= 0 and non-finite parameters', () => {
    expect(failureReason(() => nrtl({ a12: 1, b12: 0, a21: 1, b21: 0, alpha: 0 }))).toBe('input');
    expect(failureReason(() => nrtl({ a12: NaN, b12: 0, a21: 1, b21: 0, alpha: 0.3 }))).toBe('input');
  });
});

describe('NRTL activity coefficients', () => {
  // ln gamma_1 = mu_A/RT - ln x1 and ln gamma_2 = mu_B/RT - ln x2 (spec: ln a_i = mu_i/RT).
  // The dilute component's fraction is passed as given (y = x1 for component 1), as the core takes it.
  const lnGamma1 = (p: NrtlParams, T: number, x1: number) => {
    const x = 1 - x1, iso = nrtl(p).at(T);
    return muA(iso, x, x1) / iso.RT - Math.log(x1);
  };
  const lnGamma2 = (p: NrtlParams, T: number, x2: number) => {
    const iso = nrtl(p).at(T);
    return muB(iso, x2, 1 - x2) / iso.RT - Math.log(x2);
  };

  it('infinite dilution: ln gamma_1^inf = tau21 + tau12 exp(-alpha tau12), and 1 <-> 2', () => {
    for (const { p } of SETS) {
      for (const T of TS) {
        const { tau12, tau21 } = taus(p, T);
        // Renon & Prausnitz, AIChE J. 14 (1968) 135: ln gamma_1^inf = tau21 + tau12 G12, G12 = exp(-alpha tau12)
        const want1 = tau21 + tau12 * Math.exp(-p.alpha * tau12);
        // Renon & Prausnitz (1968), the same with 1 and 2 exchanged: ln gamma_2^inf = tau12 + tau21 G21
        const want2 = tau12 + tau21 * Math.exp(-p.alpha * tau21);
        // Component 1 (A) is infinitely dilute at x -> 1, component 2 (B) at x -> 0. Linear
        // extrapolation from dilutions 1e-9 and 2e-9 removes the first-order term; what is left
        // is O(1e-18 tau^3) plus rounding of mu/RT (a few 1e-15 at |ln 1e-9| = 21) tripled by the
        // extrapolation: 1e-11 is far above both and far below any wrong term.
        const got1 = 2 * lnGamma1(p, T, 1e-9) - lnGamma1(p, T, 2e-9);
        const got2 = 2 * lnGamma2(p, T, 1e-9) - lnGamma2(p, T, 2e-9);
        expect(Math.abs(got1 - want1), `ln gamma_1^inf at T = ${T}: got ${got1}, want ${want1}`).toBeLessThan(1e-11);
        expect(Math.abs(got2 - want2), `ln gamma_2^inf at T = ${T}: got ${got2}, want ${want2}`).toBeLessThan(1e-11);
      }
    }
  });

  it('at finite composition, ln gamma_i matches the NRTL activity-coefficient equations', () => {
    for (const { p } of SETS) {
      for (const T of TS) {
        const { tau12, tau21 } = taus(p, T);
        const G12 = Math.exp(-p.alpha * tau12), G21 = Math.exp(-p.alpha * tau21);
        for (const x2 of [0.05, 0.3, 0.5, 0.8, 0.97]) {
          const x1 = 1 - x2;
          // Renon & Prausnitz, AIChE J. 14 (1968) 135:
          //   ln gamma_1 = x2^2 [tau21 (G21/(x1 + x2 G21))^2 + tau12 G12/(x2 + x1 G12)^2]
          //   ln gamma_2 = x1^2 [tau12 (G12/(x2 + x1 G12))^2 + tau21 G21/(x1 + x2 G21)^2]
          const want1 = x2 * x2 * (tau21 * (G21 / (x1 + x2 * G21)) ** 2 + (tau12 * G12) / (x2 + x1 * G12) ** 2);
          const want2 = x1 * x1 * (tau12 * (G12 / (x2 + x1 * G12)) ** 2 + (tau21 * G21) / (x1 + x2 * G21) ** 2);
          // mu/RT is a difference of terms of size |ln x| + |tau| (a few units); rounding is a
          // few 1e-16 of that: 1e-12 absolute leaves ample margin.
          expect(Math.abs(lnGamma1(p, T, x1) - want1), `ln gamma_1 at x2 = ${x2}, T = ${T}`).toBeLessThan(1e-12);
          expect(Math.abs(lnGamma2(p, T, x2) - want2), `ln gamma_2 at x2 = ${x2}, T = ${T}`).toBeLessThan(1e-12);
        }
      }
    }
  });
});
