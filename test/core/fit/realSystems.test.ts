/**
 * Fits to measured gap boundaries of two real liquid pairs, compared with their published critical
 * points (Redlich–Kister through the linear tie-line fit, NRTL through the general fit), and the
 * Flory–Huggins chi(T) of a polymer solution from the critical points of three fractions, compared
 * with the authors' own analysis. These models are mean-field descriptions: their dome closes as
 * (Tc - T)^(1/2) while real coexistence curves close as (Tc - T)^0.33, flatter at the top, so a
 * model fitted to boundaries below Tc places its critical point within a few kelvin of the
 * measured one, not exactly on it. The tolerances below say how many.
 */
import { describe, expect, it } from 'vitest';
import { moleFraction, molarMass } from '../../../src/core/composition';
import { criticalPoints } from '../../../src/core/critical';
import type { Measurement } from '../../../src/core/fit/measurements';
import { fitModel, fitSystems } from '../../../src/core/fit/nonlinear';
import { fitTieLines } from '../../../src/core/fit/tieLines';
import { floryHugginsFamily } from '../../../src/core/models/floryHuggins';
import { nrtlFamily } from '../../../src/core/models/nrtl';
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

  for (const alpha of [0.2, 0.3]) {
    it(`NRTL (a12, b12, a21, b21 free, alpha = ${alpha}) through the general fit: the three tie-lines, the critical point and G^E`, () => {
      // alpha 0.2 and 0.3: the values Renon and Prausnitz, AIChE J. 14 (1968) 135, suggest for
      // partly miscible pairs (from memory). Default starts, no values given.
      const tieLines: Measurement[] = data.map((d) => ({ kind: 'tie-line', ...d }));
      const fit = fitModel(nrtlFamily, [
        { name: 'a12', free: true }, { name: 'b12', free: true }, { name: 'a21', free: true }, { name: 'b21', free: true },
        { name: 'alpha', value: alpha, free: false },
      ], tieLines);
      // Every composition within 0.015 and their rms within 0.008: the data are read to 0.001,
      // but a mean-field model closes its dome as (Tc - T)^0.5 while real liquids close as
      // (Tc - T)^0.33 (see the header), and two of the tie-lines lie within 0.6 K of the top,
      // where the measured phases are still 0.05 and 0.15 apart.
      for (const row of fit.rows) expect(Math.abs(row.residual), `${row.quantity} of tie-line ${row.measurement + 1}`).toBeLessThan(0.015);
      expect(Math.sqrt(fit.rows.reduce((s, r) => s + r.residual ** 2, 0) / fit.rows.length)).toBeLessThan(0.008);
      // Che et al. (1996, above): Tc = 271.0 K at x = 0.35; 1.5 K and 0.03 as for the
      // Redlich–Kister fit above (the two studies disagree by about 1 K).
      const points = criticalPoints(fit.model);
      expect(points).toHaveLength(1);
      expect(points[0].kind).toBe('upper');
      expect(Math.abs(points[0].T - published.T)).toBeLessThan(1.5);
      expect(Math.abs(points[0].x - published.x)).toBeLessThan(0.03);
      // Che et al. (1996, abstract): the largest G^E at 263.07 K is 1174 J/mol. Within 5 %: theirs
      // comes from their own coexistence data through a model the abstract does not name, ours
      // from the 1973 tie-lines extrapolated 2.6 K below the lowest (common practice, no published
      // source for the margin).
      const iso = fit.model.at(263.07);
      let gE = 0;
      for (let i = 1; i < 1000; i++) {
        const x = i / 1000, y = 1 - x;
        gE = Math.max(gE, iso.g(x, y) - iso.RT * (x * Math.log(x) + y * Math.log(y)));
      }
      expect(Math.abs(gE / 1174 - 1)).toBeLessThan(0.05);
    });
  }

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

describe('poly(α-methylstyrene) (B) in methylcyclohexane (A): Flory–Huggins chi(T) from the critical points of three fractions', () => {
  // "Phase separation temperatures in the [system] poly(α-methylstyrene) + methylcyclohexane",
  // abstract (its authors and journal are not shown in the stored copy,
  // https://staging.scite.ai/reports/phase-separation-temperatures-in-the-VVmZpR): number-average
  // molar masses 19 700, 32 300, 72 000 g/mol, critical temperatures (305.70 +- 0.09) K,
  // (318.3 +- 0.4) K, (328.9 +- 0.4) K; from them theta = (357 +- 5) K and psi1 = 0.49 +- 0.06,
  // and chi1 at Tc of 0.54, 0.56, 0.58 (+- 0.01), uncertainties one standard deviation.
  // In Flory–Huggins terms (Flory, Principles of Polymer Chemistry (1953), ch. XII-XIII)
  // chi = 1/2 - psi1 + psi1 theta / T, i.e. chi.A = 1/2 - psi1, chi.B = psi1 theta, and the
  // critical condition of a chain of r segments is chi_c = (1 + r^-1/2)^2 / 2, which is the
  // Shultz–Flory relation the authors fit. One chi(T) for all three fractions, each its own system.
  const fractions = [{ M: 19700, Tc: 305.70, sigma: 0.09 }, { M: 32300, Tc: 318.3, sigma: 0.4 }, { M: 72000, Tc: 328.9, sigma: 0.4 }];
  // r = molar volume of the polymer / that of the solvent. From memory: methylcyclohexane
  // 98.19 g/mol, 0.7694 g/cm3 at 20 degC; poly(α-methylstyrene) 1.065 g/cm3. A density of the
  // polymer anywhere from 1.04 to 1.08 g/cm3 moves theta by < 0.5 K and psi1 by < 0.01.
  const Vsolvent = 98.19 / 0.7694, vPolymer = 1 / 1.065;
  const systems = fractions.map((f) => ({ fixed: { NB: (f.M * vPolymer) / Vsolvent }, data: [{ kind: 'critical point' as const, Tc: f.Tc, sigmaT: f.sigma }] }));

  it('theta and psi1 within the published standard deviations', () => {
    const fit = fitSystems(floryHugginsFamily, [{ name: 'NA', value: 1, free: false }, { name: 'chi.A', free: true }, { name: 'chi.B', free: true }], systems);
    const psi1 = 0.5 - fit.values['chi.A'], theta = fit.values['chi.B'] / psi1;
    // one published standard deviation each: 5 K and 0.06
    expect(Math.abs(theta - 357)).toBeLessThan(5);
    expect(Math.abs(psi1 - 0.49)).toBeLessThan(0.06);
    // The three critical temperatures: no worse, in the weighted sum of squares, than the
    // published theta and psi1 meet them through the same critical condition
    // (1/Tc = (1/theta)(1 + (r^-1/2 + 1/(2r))/psi1), with these r: 1.6 to 4.2 K low), since both
    // describe the same three points with two parameters and ours minimises that sum.
    const publishedS = fractions.reduce((sum, f, i) => {
      const r = systems[i].fixed.NB;
      const Tc = 357 / (1 + (1 / Math.sqrt(r) + 1 / (2 * r)) / 0.49);
      return sum + ((Tc - f.Tc) / f.sigma) ** 2;
    }, 0);
    expect(fit.S).toBeLessThan(publishedS);
    // chi at each Tc within the published 0.01. The abstract lists 0.54 for sample A (the
    // shortest chain) and 0.58 for C; the critical condition above makes chi_c fall as the chain
    // grows, so the values are compared in that order (0.58 for A, 0.54 for C).
    const chiAtTc = fractions.map((f) => fit.values['chi.A'] + fit.values['chi.B'] / f.Tc);
    [0.58, 0.56, 0.54].forEach((published, i) => expect(Math.abs(chiAtTc[i] - published), `fraction ${i + 1}`).toBeLessThan(0.01));
  });
});
