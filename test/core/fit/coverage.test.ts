/**
 * Uncertainty of fitted parameters and of results derived from them (src/core/fit/nonlinear.ts,
 * src/core/fit/propagation.ts).
 * - Coverage: many synthetic data sets with known Gaussian scatter; the stated 95 % intervals of a
 *   gap boundary and of Tc must contain the truth in 95 % +- 3 % of them. The data are made by our
 *   own common-tangent solver from known parameters (a round trip; the statistics are the check).
 * (Linear propagation against Monte Carlo and finite differences, and refusals: propagation.test.ts.)
 */
import { describe, expect, it } from 'vitest';
import { phaseMap } from '../../../src/core/binodal';
import { R } from '../../../src/core/constants';
import { MixgapError } from '../../../src/core/errors';
import type { Measurement } from '../../../src/core/fit/measurements';
import { fitModel } from '../../../src/core/fit/nonlinear';
import { buildModel } from '../../../src/core/fit/parameters';
import { propagate } from '../../../src/core/fit/propagation';
import type { BinaryModel } from '../../../src/core/model';
import { redlichKisterFamily } from '../../../src/core/models/redlichKister';

/** mulberry32 (T. Ettinger, public domain, 2017) and Box–Muller (Box & Muller, Ann. Math. Stat. 29 (1958) 610). */
function gaussian(seed: number): () => number {
  let a = seed >>> 0;
  const uniform = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return () => Math.sqrt(-2 * Math.log(1 - uniform())) * Math.cos(2 * Math.PI * uniform());
}

const truth = { L0: 22000, 'L0.b': -4 };
const temperatures = [700, 800, 900, 950];
const exact = (() => {
  const model = buildModel(redlichKisterFamily, truth);
  return temperatures.map((T) => ({ T, gap: phaseMap(model.at(T)).gaps[0] }));
})();

/** Tie-lines of the true model with Gaussian scatter sigma on each composition. */
function noisyTieLines(noise: () => number, sigma: number): Measurement[] {
  return exact.map(({ T, gap }) => ({ kind: 'tie-line', T, xLow: gap.low.x + sigma * noise(), xHigh: gap.high.x + sigma * noise(), sigma }));
}

const spec = [{ name: 'L0', free: true }, { name: 'L0.b', free: true }];
/** Porter, Easterling & Sherif, Phase Transformations in Metals and Alloys, 3rd ed. (2009), ch. 1: Tc = Omega / 2R at x = 1/2; with Omega = L0(T) = a + b T, 2 R Tc = a + b Tc. */
const Tc = (model: BinaryModel) => {
  // L0(T) = a + b T read off the model itself: g''(1/2) = 4 R T - 2 L0(T) for a single term
  const L0 = (T: number) => (4 * R * T - model.at(T).d2g(0.5, 0.5)) / 2;
  const b = (L0(1000) - L0(500)) / 500, a = L0(500) - 500 * b;
  return a / (2 * R - b);
};
const lowAt = (T: number) => (model: BinaryModel) => {
  const { gaps } = phaseMap(model.at(T));
  if (gaps.length === 0) throw new MixgapError('none', `no gap at ${T} K`);
  return gaps[0].low.x;
};

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

