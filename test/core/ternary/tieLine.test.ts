/**
 * Distribution coefficients and selectivity of a tie-line (definitions: the ternary spec, as in
 * Treybal, Liquid Extraction, 2nd ed. (1963) ch. 2, from memory).
 */
import { describe, expect, it } from 'vitest';
import { ternaryFloryHuggins } from '../../../src/core/ternary/floryHuggins';
import { ternaryRedlichKister } from '../../../src/core/ternary/redlichKister';
import { massFractions, selectivity, tieLineAt } from '../../../src/core/ternary/tieLine';
import { failureReason } from '../support/compare';
import { R_SPEC } from '../support/spec';

const T = 300, RT = R_SPEC * T;
const term = (w: number) => ({ a: w * RT, b: 0, c: 0 });
// Invented: B and C nearly immiscible, A dissolves in both alike (symmetric in B and C).
const SYM = ternaryRedlichKister({ AB: [term(0.5)], AC: [term(0.5)], BC: [term(2.8)] });

describe('tie-line distribution', () => {
  it('symmetric in B and C: mirror phases give K_A = 1, K_B = 1/K_C and S_BC = K_B^2', () => {
    // By the B <-> C symmetry of g, the tie-line through a feed with x_B = x_C joins (a, b, c) and
    // (a, c, b) (derived here from the spec's g; common practice, no published source).
    const t = tieLineAt(SYM, T, 0.2, 0.4, 0.4);
    const [p, q] = t.phases;
    expect(p.xC).toBeLessThan(q.xC); // spec order
    // mirror images to the split's accuracy (Newton to 1e-12 in log-ratio)
    expect(Math.abs(p.xB - q.xC) / p.xB).toBeLessThan(1e-9);
    expect(Math.abs(t.K[0] - 1)).toBeLessThan(1e-9);
    expect(Math.abs(t.K[1] * t.K[2] - 1)).toBeLessThan(1e-9);
    expect(Math.abs(selectivity(t.K, 1, 2) - t.K[1] ** 2) / t.K[1] ** 2).toBeLessThan(1e-9);
    expect(t.K[1]).toBeLessThan(1); // phase 2 is the C-rich one, poorer in B
  });

  it('mass basis: K from mass fractions w_i = x_i M_i / sum x_j M_j', () => {
    const M: [number, number, number] = [46.07, 18.02, 120.5]; // invented molar masses, g/mol
    const mole = tieLineAt(SYM, T, 0.2, 0.4, 0.4), mass = tieLineAt(SYM, T, 0.2, 0.4, 0.4, M);
    const [p, q] = mole.phases;
    const w = (x: typeof p) => {
      const s = x.xA * M[0] + x.xB * M[1] + x.xC * M[2];
      return [x.xA * M[0] / s, x.xB * M[1] / s, x.xC * M[2] / s];
    };
    const wp = w(p), wq = w(q);
    // the same arithmetic in another order: a few ulp
    for (let i = 0; i < 3; i++) expect(Math.abs(mass.K[i] - wq[i] / wp[i]) / mass.K[i]).toBeLessThan(1e-14);
    // K_i(mass) = K_i(mole) * (mean molar mass of x') / (mean molar mass of x'')
    const mp = p.xA * M[0] + p.xB * M[1] + p.xC * M[2], mq = q.xA * M[0] + q.xB * M[1] + q.xC * M[2];
    expect(Math.abs(mass.K[1] - mole.K[1] * mp / mq) / mass.K[1]).toBeLessThan(1e-14);
    expect(failureReason(() => massFractions(p, [1, 0, 2]))).toBe('range');
  });

  it('no tie-line through a one-phase or three-phase feed; no mass basis for volume fractions', () => {
    expect(failureReason(() => tieLineAt(SYM, T, 0.8, 0.1, 0.1))).toBe('none');
    const three = ternaryRedlichKister({ AB: [term(3.5)], AC: [term(3.5)], BC: [term(3.5)] });
    expect(failureReason(() => tieLineAt(three, T, 1 / 3, 1 / 3, 1 / 3))).toBe('none');
    const fh = ternaryFloryHuggins({ NA: 1, NB: 20, NC: 2, chiAB: { A: 0.9, B: 0 }, chiAC: { A: 1.8, B: 0 }, chiBC: { A: 0.6, B: 0 } });
    expect(failureReason(() => tieLineAt(fh, T, 0.3, 0.3, 0.4, [1, 2, 3]))).toBe('input');
  });
});
