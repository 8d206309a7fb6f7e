/**
 * Cards that carry their parameters' uncertainties (u() and r() rows, after the guide to
 * uncertainty in measurement, JCGM 100:2008: u(x_i) standard uncertainty, r(x_i, x_j) correlation
 * coefficient, covariance u_i u_j r_ij, its eq. 14). The reader must give the covariance in SI
 * units, rebuild exactly the card's model from its SI values, leave every result of the card
 * unchanged, and refuse every malformed u()/r() row with #VALUE! naming it.
 */
import { describe, expect, it } from 'vitest';
import { buildModel } from '../../src/core/fit/parameters';
import { system } from '../../src/functions/args';
import { checkCard, gapLow, tCrit } from '../../src/functions/functions';
import { failure } from './support/failure';

const rk = [
  ['model', 'redlich-kister'], ['energy', 'kJ/mol'],
  ['L0', 20], ['L0.b', -0.002], ['L1', 1.5],
];

describe('u() and r() rows become the covariance in SI units', () => {
  it('energies scaled by the card unit (1 kJ/mol = 1000 J/mol, definition of the SI prefix k), correlation as given', () => {
    const card = [...rk, ['u(L0)', 0.3], ['u( L1 )', 0.2], ['r( L1 , L0 )', -0.5]];
    const c = system(card).uncertainty!;
    expect(c.names).toEqual(['L0', 'L1']);
    // 0.3 * 1000 and its square are rounded a few times (~1e-11 absolute here); toBeCloseTo(6) allows 5e-7
    expect(c.covariance[0][0]).toBeCloseTo(300 * 300, 6);
    expect(c.covariance[1][1]).toBeCloseTo(200 * 200, 6);
    expect(c.covariance[0][1]).toBeCloseTo(-0.5 * 300 * 200, 6);
    expect(c.covariance[1][0]).toBe(c.covariance[0][1]);
    expect(c.values).toEqual({ L0: 20000, 'L0.b': -2, L1: 1500 });
  });

  it('the SI values rebuild exactly the card\'s model, for every family (same model key)', () => {
    for (const card of [
      [...rk, ['u(L0.b)', 0.001]],
      [['model', 'regular'], ['energy', 'kcal/mol'], ['omega', 5], ['u(omega)', 0.1]],
      [['model', 'flory-huggins'], ['NA', 100], ['NB', 1], ['chi.A', 0.1], ['chi.B', 200], ['u(chi.A)', 0.01], ['u(chi.B)', 5], ['r(chi.A, chi.B)', -0.99]],
      [['model', 'nrtl'], ['energy', 'kJ/mol'], ['a12', 1], ['b12', 300], ['a21', 0.5], ['b21', 400], ['alpha', 0.3], ['u(b12)', 10]],
    ]) {
      const sys = system(card);
      const c = sys.uncertainty!;
      expect(buildModel(c.family, c.values).key, JSON.stringify(card)).toBe(sys.model.key);
    }
  });

  it('a card without u() has no uncertainty, and u() rows change no result (same bits)', () => {
    expect(system(rk).uncertainty).toBeUndefined();
    const withU = [...rk, ['u(L0)', 0.3], ['u(L1)', 0.2], ['r(L0, L1)', 0.1]];
    expect(gapLow(700, withU)).toBe(gapLow(700, rk));
    expect(tCrit(withU)).toBe(tCrit(rk));
  });

  it('a card laid out in two rows (keys, then values) reads its u() and r() too', () => {
    const c = system([['model', 'omega', 'u(omega)'], ['regular', 20000, 150]]).uncertainty!;
    expect(c.covariance).toEqual([[150 * 150]]);
  });

  it('CHECKCARD names the uncertainties and correlations', () => {
    const line = checkCard([...rk, ['u(L0)', 0.3], ['u(L1)', 0.2], ['r(L0, L1)', -0.5]]);
    expect(line).toContain('u(L0) = 0.3, u(L1) = 0.2');
    expect(line).toContain('r(L0, L1) = -0.5');
    expect(checkCard(rk)).not.toContain('uncertaint');
  });
});

describe('malformed u() and r() rows are #VALUE! naming the row', () => {
  const cases: Array<[string, unknown[][], RegExp]> = [
    ['u() of a parameter the card does not give', [...rk, ['u(L2)', 1]], /"u\(L2\)": the card gives no value for L2/],
    ['u() of a key of another model', [...rk, ['u(chi.A)', 1]], /"u\(chi\.A\)": chi\.A is not a parameter of a redlich-kister card/],
    ['negative u', [...rk, ['u(L0)', -1]], /"u\(L0\)" = -1: a standard uncertainty is a number >= 0/],
    ['u as text', [...rk, ['u(L0)', 'small']], /"u\(L0\)" must be a number/],
    ['r() without both u()', [...rk, ['u(L0)', 1], ['r(L0, L1)', 0.5]], /"r\(L0, L1\)": L1 has no u\(\) row/],
    ['|r| > 1', [...rk, ['u(L0)', 1], ['u(L1)', 1], ['r(L0, L1)', 1.2]], /"r\(L0, L1\)" = 1.2: a correlation coefficient lies between -1 and 1/],
    ['the same pair twice, in either order', [...rk, ['u(L0)', 1], ['u(L1)', 1], ['r(L0, L1)', 0.2], ['r(L1,L0)', 0.2]], /given twice/],
    ['r(X, X)', [...rk, ['u(L0)', 1], ['r(L0, L0)', 1]], /with itself/],
    // r12 = r13 = 0.9, r23 = -0.9: det = 1 - 3(0.81) - 2(0.729) < 0 (a 3 x 3 correlation matrix is
    // positive semidefinite only if its determinant is >= 0: Sylvester's criterion)
    ['not positive semidefinite', [...rk, ['u(L0)', 1], ['u(L0.b)', 1], ['u(L1)', 1], ['r(L0, L0.b)', 0.9], ['r(L0, L1)', 0.9], ['r(L0.b, L1)', -0.9]], /correlations of L0, L0\.b, L1 cannot hold together/],
    ['a misspelled key next to u() rows', [...rk, ['u(L0)', 1], ['LO', 1]], /unknown key "LO"/],
  ];
  for (const [what, card, message] of cases) {
    it(what, () => {
      const f = failure(() => gapLow(700, card));
      expect(f.code).toBe('#VALUE!');
      expect(f.message).toMatch(message);
    });
  }

  it('a correlation of exactly 1 is allowed (semidefinite, not definite)', () => {
    expect(system([...rk, ['u(L0)', 1], ['u(L1)', 1], ['r(L0, L1)', 1]]).uncertainty!.covariance[0][1]).toBeCloseTo(1e6, 3);
  });
});
