/**
 * Uncertainty of fitted parameters and of results derived from them (src/core/fit/nonlinear.ts,
 * src/core/fit/propagation.ts).
 * (Coverage of the stated intervals: coverage.test.ts.)
 * - Linear propagation against Monte Carlo and against finite differences along the principal axes
 *   of the covariance, on the same fit.
 * - Results that do not exist or are far from linear within the band fail with a reason.
 */
import { create, eigsDependencies } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { activities } from '../../../src/core/activity';
import { phaseMap } from '../../../src/core/binodal';
import { criticalPoints } from '../../../src/core/critical';
import { MixgapError } from '../../../src/core/errors';
import { gapTemperature } from '../../../src/core/gapTemperature';
import { leverFractions } from '../../../src/core/leverRule';
import type { Measurement } from '../../../src/core/fit/measurements';
import { fitModel, modelAt, type NonlinearFit } from '../../../src/core/fit/nonlinear';
import { buildModel } from '../../../src/core/fit/parameters';
import { propagate } from '../../../src/core/fit/propagation';
import type { BinaryModel } from '../../../src/core/model';
import { floryHugginsFamily } from '../../../src/core/models/floryHuggins';
import { redlichKisterFamily } from '../../../src/core/models/redlichKister';

const math = create({ eigsDependencies });

import { exact, gaussian, lowAt, noisyTieLines, spec, Tc } from './support/synthetic';

/** sigma of r from central differences at +- one standard deviation along each principal axis of C. */
function principalAxes(fit: NonlinearFit, r: (m: BinaryModel) => number): number {
  const theta = fit.free.map((n) => fit.values[n]);
  const { eigenvectors } = math.eigs(fit.covariance!) as unknown as { eigenvectors: Array<{ value: number; vector: number[] }> };
  let variance = 0;
  for (const { value, vector } of eigenvectors) {
    const s = vector.map((v) => Number(v) * Math.sqrt(Number(value)));
    const d = (r(modelAt(fit, theta.map((t, j) => t + s[j]))) - r(modelAt(fit, theta.map((t, j) => t - s[j])))) / 2;
    variance += d * d;
  }
  return Math.sqrt(variance);
}

/** sigma of r over parameter vectors drawn from N(theta, C) (Cholesky factor of the 2 x 2 C). */
function monteCarlo(fit: NonlinearFit, r: (m: BinaryModel) => number, samples: number, seed: number): number {
  const theta = fit.free.map((n) => fit.values[n]);
  const C = fit.covariance!;
  const l11 = Math.sqrt(C[0][0]), l21 = C[1][0] / l11, l22 = Math.sqrt(C[1][1] - l21 * l21);
  const noise = gaussian(seed);
  let sum = 0, sum2 = 0;
  for (let i = 0; i < samples; i++) {
    const z1 = noise(), z2 = noise();
    const v = r(modelAt(fit, [theta[0] + l11 * z1, theta[1] + l21 * z1 + l22 * z2]));
    sum += v; sum2 += v * v;
  }
  const mean = sum / samples;
  return Math.sqrt((sum2 - samples * mean * mean) / (samples - 1));
}

describe('linear propagation agrees with Monte Carlo and finite-difference propagation within 2 %', () => {
  // Relative weights (sigma estimated from the residuals), one seeded data set.
  const fit = fitModel(redlichKisterFamily, spec, noisyTieLines(gaussian(7), 0.004));
  // 5e4 Monte Carlo samples: the relative standard error of a standard deviation is
  // 1/sqrt(2 N) = 0.32 %, so 2 % is six standard errors.
  it('Tc (closed form) against Monte Carlo', () => {
    const linear = propagate(fit, Tc, 'Tc').sigma;
    expect(Math.abs(linear / monteCarlo(fit, Tc, 50000, 11) - 1)).toBeLessThan(0.02);
  });
  it('ln gamma_B at 850 K, x = 0.1 (activities) against Monte Carlo', () => {
    const lnGammaB = (m: BinaryModel) => activities(m, 850, 0.1).lnGammaB;
    const linear = propagate(fit, lnGammaB, 'ln gamma_B').sigma;
    expect(Math.abs(linear / monteCarlo(fit, lnGammaB, 50000, 12) - 1)).toBeLessThan(0.02);
  });
  it('gap boundaries and a phase fraction at 850 K against differences along the principal axes', () => {
    for (const [what, r] of [
      ['x\'', lowAt(850)],
      ['x\'\'', (m: BinaryModel) => phaseMap(m.at(850)).gaps[0].high.x],
      ['phase fraction of x0 = 0.4', (m: BinaryModel) => leverFractions(0.4, phaseMap(m.at(850)).gaps[0]).high],
    ] as const) {
      const linear = propagate(fit, r, what).sigma;
      expect(Math.abs(linear / principalAxes(fit, r) - 1), what).toBeLessThan(0.02);
    }
  });
  it('the gap temperature of a polymer solution fitted to noisy cloud points, against the principal axes', () => {
    const fh = { NA: 1, NB: 50, 'chi.A': -0.2, 'chi.B': 300 };
    const model = buildModel(floryHugginsFamily, fh);
    const critical = criticalPoints(model);
    const noise = gaussian(99);
    const data: Measurement[] = [0.04, 0.08, 0.12, 0.2, 0.3].map((x0) => ({ kind: 'cloud point', x0, T: gapTemperature(model, x0, critical) + 0.3 * noise() }));
    const fhFit = fitModel(floryHugginsFamily, [{ name: 'NA', value: 1, free: false }, { name: 'NB', value: 50, free: false }, { name: 'chi.A', free: true }, { name: 'chi.B', free: true }], data);
    const tgap = (m: BinaryModel) => gapTemperature(m, 0.1, criticalPoints(m));
    const linear = propagate(fhFit, tgap, 'TGAP').sigma;
    expect(Math.abs(linear / principalAxes(fhFit, tgap) - 1)).toBeLessThan(0.02);
  });
});

describe('no uncertainty where the result does not exist or is far from linear within the band', () => {
  const fit = fitModel(redlichKisterFamily, spec, noisyTieLines(gaussian(7), 0.004));
  const { value: tc, sigma: sTc } = propagate(fit, Tc, 'Tc');
  const reason = (f: () => unknown) => {
    try { f(); } catch (e) { return e instanceof MixgapError ? `${e.reason}: ${e.message}` : `other: ${String(e)}`; }
    return 'no error';
  };
  it('a boundary half a standard deviation of Tc below Tc: the gap vanishes within 2 sigma', () => {
    expect(reason(() => propagate(fit, lowAt(tc - 0.5 * sTc), 'x\''))).toMatch(/^none: x' does not exist everywhere within 2 standard deviations/);
  });
  it('a boundary 4 standard deviations of Tc below Tc: x\' ~ sqrt(Tc - T) is far from linear over +-2 sigma', () => {
    expect(reason(() => propagate(fit, lowAt(tc - 4 * sTc), 'x\''))).toMatch(/^range: x' is too far from linear/);
  });
  it('the same boundary far below Tc has an uncertainty', () => {
    expect(propagate(fit, lowAt(850), 'x\'').sigma).toBeGreaterThan(0);
  });
});

describe('no residual to estimate the scatter from', () => {
  // One critical point (Tc, xc) determines L0 and L1 exactly: with relative weights there is no
  // covariance (s^2 = S/0); with absolute uncertainties there is, (J^T J)^-1.
  const c = criticalPoints(buildModel(redlichKisterFamily, { L0: 20000, L1: 2500 }))[0];
  const data: Measurement[] = [{ kind: 'critical point', Tc: c.T, xc: c.x, sigmaT: 1, sigmaX: 0.005 }];
  const free = [{ name: 'L0', free: true }, { name: 'L1', free: true }];
  it('relative weights: propagation says why it cannot', () => {
    const fit = fitModel(redlichKisterFamily, free, data);
    expect(fit.dof).toBe(0);
    expect(fit.covariance).toBeUndefined();
    expect(() => propagate(fit, lowAt(c.T - 100), 'x\'')).toThrow(/^the fit has no covariance/);
  });
  it('absolute uncertainties: Tc comes back with the stated 1 K', () => {
    const fit = fitModel(redlichKisterFamily, free, data, { absolute: true });
    // Tc is one of the two measured quantities and the fit is exact, so its propagated uncertainty
    // is its stated one (linear algebra: J invertible, g^T (J^T J)^-1 g = sigma_T^2 for g = row of J);
    // the critical search's Brent tolerance and the 1e-6 gradient leave it good to ~1e-5
    const tc = propagate(fit, (m) => criticalPoints(m)[0].T, 'Tc');
    expect(Math.abs(tc.sigma - 1)).toBeLessThan(1e-4);
  });
});
