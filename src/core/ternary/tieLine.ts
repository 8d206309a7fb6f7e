/**
 * A tie-line's distribution coefficients and selectivities. For the tie-line through a feed, with
 * x' the first and x'' the second phase in the spec's order (x' the poorer in C):
 *   K_i = x_i'' / x_i'   (mole basis; the mass basis uses w_i = x_i M_i / sum_j x_j M_j)
 *   S_ij = K_i / K_j
 */
import { fail, kelvin, msg } from '../errors';
import type { TernaryModel } from './model';
import { splitFeed, type TernaryPoint } from './split';

export interface TieLine {
  /** x' and x'' (spec order). */
  phases: [TernaryPoint, TernaryPoint];
  /** K_A, K_B, K_C. */
  K: [number, number, number];
}

/** K_i = x_i'' / x_i' of two phases. */
export function distributionCoefficients(first: TernaryPoint, second: TernaryPoint): [number, number, number] {
  return [second.xA / first.xA, second.xB / first.xB, second.xC / first.xC];
}

/** Mass fractions of a mole-fraction composition, with molar masses M_A, M_B, M_C (g/mol). */
export function massFractions(p: TernaryPoint, M: readonly [number, number, number]): TernaryPoint {
  M.forEach((m, i) => {
    if (!(Number.isFinite(m) && m > 0)) fail('range', `the molar mass of ${'ABC'[i]} must be a positive number of g/mol (got ${m})`);
  });
  const mA = p.xA * M[0], mB = p.xB * M[1], mC = p.xC * M[2], s = mA + mB + mC;
  return { xA: mA / s, xB: mB / s, xC: mC / s };
}

/**
 * The tie-line through a feed at T and its distribution coefficients (mole basis, or mass basis
 * when molar masses are given). Fails with 'none' when the feed is one phase or three.
 */
export function tieLineAt(model: TernaryModel, T: number, xA: number, xB: number, xC: number, molarMasses?: readonly [number, number, number]): TieLine {
  if (molarMasses && model.composition !== 'mole fraction') {
    fail('input', 'a mass-basis distribution coefficient needs mole fractions; this model uses volume fractions');
  }
  const r = splitFeed(model, T, xA, xB, xC);
  if (r.phases.length !== 2) {
    fail('none', r.phases.length === 1
      ? msg`the feed (${xA}, ${xB}, ${xC}) is one phase at T = ${kelvin(T)}: no tie-line through it`
      : msg`the feed (${xA}, ${xB}, ${xC}) lies in a three-phase triangle at T = ${kelvin(T)}: no single tie-line through it`);
  }
  const [p, q] = r.phases;
  const K = molarMasses ? distributionCoefficients(massFractions(p, molarMasses), massFractions(q, molarMasses)) : distributionCoefficients(p, q);
  return { phases: [p, q], K };
}

/** S_ij = K_i / K_j (i, j = 0, 1, 2 for A, B, C). */
export function selectivity(K: readonly [number, number, number], i: 0 | 1 | 2, j: 0 | 1 | 2): number {
  return K[i] / K[j];
}
