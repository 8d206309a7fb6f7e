/**
 * Synthetic data for the uncertainty tests (coverage.test.ts, propagation.test.ts): a two-parameter
 * Redlich–Kister truth, its exact tie-lines, the same tie-lines with Gaussian scatter, and two
 * results to propagate (Tc and the A-rich boundary at T).
 */
import { phaseMap } from '../../../../src/core/binodal';
import { R } from '../../../../src/core/constants';
import { MixgapError } from '../../../../src/core/errors';
import type { Measurement } from '../../../../src/core/fit/measurements';
import { buildModel } from '../../../../src/core/fit/parameters';
import type { BinaryModel } from '../../../../src/core/model';
import { redlichKisterFamily } from '../../../../src/core/models/redlichKister';

/** mulberry32 (T. Ettinger, public domain, 2017) and Box–Muller (Box & Muller, Ann. Math. Stat. 29 (1958) 610). */
export function gaussian(seed: number): () => number {
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

export const truth = { L0: 22000, 'L0.b': -4 };
export const temperatures = [700, 800, 900, 950];
export const exact = (() => {
  const model = buildModel(redlichKisterFamily, truth);
  return temperatures.map((T) => ({ T, gap: phaseMap(model.at(T)).gaps[0] }));
})();

/** Tie-lines of the true model with Gaussian scatter sigma on each composition. */
export function noisyTieLines(noise: () => number, sigma: number): Measurement[] {
  return exact.map(({ T, gap }) => ({ kind: 'tie-line', T, xLow: gap.low.x + sigma * noise(), xHigh: gap.high.x + sigma * noise(), sigma }));
}

export const spec = [{ name: 'L0', free: true }, { name: 'L0.b', free: true }];
/** Porter, Easterling & Sherif, Phase Transformations in Metals and Alloys, 3rd ed. (2009), ch. 1: Tc = Omega / 2R at x = 1/2; with Omega = L0(T) = a + b T, 2 R Tc = a + b Tc. */
export const Tc = (model: BinaryModel) => {
  // L0(T) = a + b T read off the model itself: g''(1/2) = 4 R T - 2 L0(T) for a single term
  const L0 = (T: number) => (4 * R * T - model.at(T).d2g(0.5, 0.5)) / 2;
  const b = (L0(1000) - L0(500)) / 500, a = L0(500) - 500 * b;
  return a / (2 * R - b);
};
export const lowAt = (T: number) => (model: BinaryModel) => {
  const { gaps } = phaseMap(model.at(T));
  if (gaps.length === 0) throw new MixgapError('none', `no gap at ${T} K`);
  return gaps[0].low.x;
};
