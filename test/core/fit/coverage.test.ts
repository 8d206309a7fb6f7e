/**
 * Uncertainty of fitted parameters and of results derived from them (src/core/fit/nonlinear.ts,
 * src/core/fit/propagation.ts).
 * - Coverage: many synthetic data sets with known Gaussian scatter; the stated 95 % intervals of a
 *   gap boundary and of Tc must contain the truth in 95 % +- 3 % of them. The data are made by our
 *   own common-tangent solver from known parameters (a round trip; the statistics are the check).
 * (Linear propagation against Monte Carlo and finite differences, and refusals: propagation.test.ts.)
 */
import { describe, expect, it } from 'vitest';
import { fitModel } from '../../../src/core/fit/nonlinear';
import { buildModel } from '../../../src/core/fit/parameters';
import { propagate } from '../../../src/core/fit/propagation';
import { redlichKisterFamily } from '../../../src/core/models/redlichKister';

import { gaussian, lowAt, noisyTieLines, spec, Tc, truth } from './support/synthetic';

describe('the stated 95 % intervals contain the truth in 95 % +- 3 % of synthetic data sets', () => {
  it('boundary x\' at 850 K and Tc of a two-parameter Redlich–Kister fit to noisy tie-lines (absolute sigma)', () => {
    // 400 data sets (seed 20261203): the count of hits of a correct 95 % interval has a binomial
    // standard deviation of sqrt(400 * 0.95 * 0.05) = 4.4, i.e. 1.1 %; +-3 % is 2.75 standard
    // deviations (a 0.6 % chance of failing by bad luck), while intervals off by a factor 1.25
    // in width (89 % or 99 % coverage) fail.
    const N = 400, sigma = 0.004, z = 1.959964; // z: two-sided 95 % quantile of the normal distribution
    const noise = gaussian(20261203);
    const trueModel = buildModel(redlichKisterFamily, truth);
    const trueLow = lowAt(850)(trueModel), trueTc = Tc(trueModel);
    let hitsLow = 0, hitsTc = 0;
    for (let i = 0; i < N; i++) {
      const fit = fitModel(redlichKisterFamily, spec, noisyTieLines(noise, sigma), { absolute: true });
      const low = propagate(fit, lowAt(850), 'x\' at 850 K');
      const tc = propagate(fit, Tc, 'Tc');
      if (Math.abs(low.value - trueLow) <= z * low.sigma) hitsLow++;
      if (Math.abs(tc.value - trueTc) <= z * tc.sigma) hitsTc++;
    }
    console.log(`coverage of the 95 % intervals over ${N} data sets: x' at 850 K ${hitsLow}/${N}, Tc ${hitsTc}/${N}`);
    expect(hitsLow / N).toBeGreaterThanOrEqual(0.92);
    expect(hitsLow / N).toBeLessThanOrEqual(0.98);
    expect(hitsTc / N).toBeGreaterThanOrEqual(0.92);
    expect(hitsTc / N).toBeLessThanOrEqual(0.98);
  });
});

