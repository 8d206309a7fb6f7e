/** Composition conversions, molar masses from formulas, and phase amounts on a mass basis. */
import { describe, expect, it } from 'vitest';
import { massFraction, massPhaseFractions, molarMass, moleFraction } from '../../src/core/composition';

describe('standard atomic weights (IUPAC 2021)', () => {
  // Prohaska et al., "Standard atomic weights of the elements 2021", Pure Appl. Chem. 94 (2022)
  // 573, Table 1 (single values) and the conventional values for interval elements (H, C, O).
  const iupac2021: Array<[string, number]> = [
    ['Al', 26.9815384], ['Fe', 55.845], ['Ni', 58.6934], ['Cu', 63.546], ['Zn', 65.38],
    ['Au', 196.96657], ['Na', 22.98976928], ['H', 1.008], ['C', 12.011], ['O', 15.999],
  ];
  for (const [symbol, weight] of iupac2021) {
    it(`${symbol} = ${weight}`, () => expect(molarMass(symbol)).toBe(weight));
  }

  it('formulas add the weights of their atoms', () => {
    // Sums of the values above; 1e-12 relative covers the rounding of a few additions.
    const close = (got: number, want: number) => expect(Math.abs(got - want)).toBeLessThan(1e-12 * want);
    close(molarMass('H2O'), 2 * 1.008 + 15.999);
    close(molarMass('C6H5OH'), 6 * 12.011 + 6 * 1.008 + 15.999);
    close(molarMass('(CH3)2CO'), 3 * 12.011 + 6 * 1.008 + 15.999);
    close(molarMass('CuSO4·5H2O'), 63.546 + 32.06 + 9 * 15.999 + 10 * 1.008);
    close(molarMass('Fe0.5Ni0.5'), 0.5 * 55.845 + 0.5 * 58.6934);
    close(molarMass(' Ni3Al '), 3 * 58.6934 + 26.9815384);
  });

  it('formulas that cannot be read say why', () => {
    expect(() => molarMass('Xx2')).toThrow(/"Xx" is not an element symbol/);
    expect(() => molarMass('Tc')).toThrow(/Tc has no standard atomic weight/);
    expect(() => molarMass('h2o')).toThrow(/is not an element symbol \(symbols start with a capital letter/);
    expect(() => molarMass('(CH3')).toThrow(/"\(" is never closed/);
    expect(() => molarMass('CH3)')).toThrow(/unmatched "\)"/);
    expect(() => molarMass('')).toThrow(/the formula is empty/);
  });
});

describe('mole <-> mass fraction', () => {
  it('a published worked example: 97 wt% Al, 3 wt% Cu is 98.7 at% Al, 1.30 at% Cu', () => {
    // Callister & Rethwisch, Materials Science and Engineering: An Introduction, Example Problem
    // 4.4 (eqs. 4.6a, 4.6b), with A_Al = 26.98 and A_Cu = 63.55 g/mol; results given to 3 digits.
    expect(Math.abs(100 * moleFraction(0.03, 26.98, 63.55) - 1.30)).toBeLessThan(0.005);
    expect(Math.abs(100 * moleFraction(0.97, 63.55, 26.98) - 98.7)).toBeLessThan(0.05);
    // Back from at% to wt% (eq. 4.7a): 1.30 at% is rounded by +-0.005, and dw/dx is 2.3 here,
    // so 3 wt% comes back to +-0.012.
    expect(Math.abs(100 * massFraction(0.013, 26.98, 63.55) - 3)).toBeLessThan(0.012);
    // With the IUPAC 2021 weights the example's answer is the same to its 3 digits.
    expect(Math.abs(100 * moleFraction(0.03, molarMass('Al'), molarMass('Cu')) - 1.30)).toBeLessThan(0.005);
  });

  it('conversions invert each other and keep the ends', () => {
    // common practice, no published source: exact identities, checked to rounding (1e-15)
    for (const x of [0, 1e-9, 0.2, 0.5, 0.93, 1]) {
      expect(Math.abs(moleFraction(massFraction(x, 18.015, 94.113), 18.015, 94.113) - x)).toBeLessThan(1e-15);
    }
    expect(massFraction(0.5, 50, 50)).toBe(0.5);
    expect(() => massFraction(1.2, 10, 20)).toThrow(/between 0 and 1/);
    expect(() => moleFraction(0.5, 0, 20)).toThrow(/molar mass of A must be a positive number/);
  });
});

describe('phase amounts on a mass basis', () => {
  it('agree with the mole-basis lever rule carried through each phase\'s molar mass', () => {
    // common practice, no published source: moles in each phase from the lever rule on x, masses
    // from each phase's mean molar mass M(x) = x M_B + (1 - x) M_A; 1e-14 relative rounding.
    const MA = 18.015, MB = 94.113, x0 = 0.1, x1 = 0.03, x2 = 0.3;
    const fMol = (x0 - x1) / (x2 - x1);
    const M = (x: number) => x * MB + (1 - x) * MA;
    const want = (fMol * M(x2)) / (fMol * M(x2) + (1 - fMol) * M(x1));
    const got = massPhaseFractions(x0, x1, x2, MA, MB);
    expect(Math.abs(got.high - want)).toBeLessThan(1e-14);
    expect(Math.abs(got.low + got.high - 1)).toBeLessThan(1e-15);
  });

  it('outside the gap the batch is one phase', () => {
    expect(massPhaseFractions(0.01, 0.03, 0.3, 18, 94).high).toBe(0);
    expect(massPhaseFractions(0.5, 0.03, 0.3, 18, 94).high).toBe(1);
    expect(() => massPhaseFractions(0.1, 0.3, 0.03, 18, 94)).toThrow(/must be below/);
  });
});
