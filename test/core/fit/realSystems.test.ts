/**
 * Fits to measured gap boundaries of two real liquid pairs, compared with their published critical
 * points. A Redlich–Kister model is a mean-field description: its dome closes as (Tc - T)^(1/2)
 * while real coexistence curves close as (Tc - T)^0.33, flatter at the top, so a model fitted to
 * boundaries below Tc places its critical point within a few kelvin of the measured one, not
 * exactly on it. The tolerances below say how many.
 */
import { describe, expect, it } from 'vitest';
import { moleFraction, molarMass } from '../../../src/core/composition';
import { criticalPoints } from '../../../src/core/critical';
import { fitTieLines } from '../../../src/core/fit/tieLines';
import { redlichKister } from '../../../src/core/models/redlichKister';

describe('acetonitrile (B) + water (A)', () => {
  // Benter & Schneider, Ber. Bunsen-Ges. Phys. Chem. 77 (1973) 997, as compiled by V. P. Sazonov in
  // the IUPAC-NIST Solubility Data Series 78 (acetonitrile binary systems), data sheet "Acetonitrile
  // with Water": the temperatures at which both phases were read (mole fractions of acetonitrile).
  const data = [
    { T: 265.65, xLow: 0.182, xHigh: 0.615 },
    { T: 271.35, xLow: 0.290, xHigh: 0.435 },
    { T: 271.75, xLow: 0.327, xHigh: 0.379 },
  ];
  // Che et al., Acta Chim. Sinica (Huaxue Xuebao) 54 (1996) 859, abstract: upper critical
  // temperature 271.0 K at x = 0.35.
  const published = { T: 271.0, x: 0.35 };

  it('two terms, a temperature slope on L0: critical point within 1.5 K and 0.03 of the published one', () => {
    // The two studies disagree by about 1 K (the 1973 data still show two phases at 271.75 K,
    // 0.75 K above the 1996 critical temperature), and near the flat top the critical composition
    // is read to +-0.02 at best: 1.5 K and 0.03.
    const fit = fitTieLines(data, [true, false]);
    const points = criticalPoints(redlichKister(fit.terms));
    expect(points).toHaveLength(1);
    expect(points[0].kind).toBe('upper');
    expect(Math.abs(points[0].T - published.T)).toBeLessThan(1.5);
    expect(Math.abs(points[0].x - published.x)).toBeLessThan(0.03);
    // The tie-lines themselves are met to a few thousandths (reading a published graph).
    expect(fit.rms).toBeLessThan(0.005);
  });

  it('the compiler\'s mass fractions convert to the tabulated mole fractions', () => {
    // Same data sheet: 100 w and x of acetonitrile side by side. w is given to 3 digits and x to 3
    // decimals; the larger rounding (x, +-5e-4) plus w's (+-5e-4 in w, <= 4e-4 in x) stays below 1e-3.
    const pairs = [[0.336, 0.182], [0.784, 0.615], [0.482, 0.290], [0.637, 0.435], [0.525, 0.327], [0.582, 0.379]];
    const MA = molarMass('H2O'), MB = molarMass('CH3CN');
    for (const [w, x] of pairs) expect(Math.abs(moleFraction(w, MA, MB) - x)).toBeLessThan(1e-3);
  });
});

describe('phenol (B) + water (A)', () => {
  // from memory: mutual solubility of phenol and water, wt% phenol in the water-rich and the
  // phenol-rich layer at 20-60 degC, as tabulated in chemistry handbooks (rounded to 0.1 wt%).
  const wt = [[20, 8.4, 72.2], [30, 8.8, 69.9], [40, 9.7, 66.8], [50, 12.0, 62.6], [60, 16.8, 55.1]];
  // from memory: upper critical solution temperature of phenol + water about 66 degC (339.2 K) at
  // about 34 wt% phenol.
  const MA = molarMass('H2O'), MB = molarMass('C6H5OH');
  const published = { T: 339.2, x: moleFraction(0.34, MA, MB) };
  const data = wt.map(([t, w1, w2]) => ({ T: t + 273.15, xLow: moleFraction(w1 / 100, MA, MB), xHigh: moleFraction(w2 / 100, MA, MB) }));

  it('two terms, a temperature slope on L0: critical point within 6 K and 0.03 of the published one', () => {
    // The highest tie-line is 6 K below Tc, where the mean-field dome (width ~ (Tc - T)^0.5)
    // must be stretched to meet the flatter real top: it overshoots Tc by a few kelvin. 6 K and
    // 0.03 in x (x_c ~ 0.09) allow for that and for the rounding of remembered values.
    const fit = fitTieLines(data, [true, false]);
    const points = criticalPoints(redlichKister(fit.terms));
    expect(points).toHaveLength(1);
    expect(points[0].kind).toBe('upper');
    expect(Math.abs(points[0].T - published.T)).toBeLessThan(6);
    expect(Math.abs(points[0].x - published.x)).toBeLessThan(0.03);
  });
});
