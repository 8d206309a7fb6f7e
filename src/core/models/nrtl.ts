import { R } from '../constants';
import { fail } from '../errors';
import type { ModelFamily } from '../family';
import type { BinaryModel, Isotherm } from '../model';

/** NRTL parameters: tau_ij = a_ij + b_ij / T (a dimensionless, b in K) and the non-randomness alpha. */
export interface NrtlParameters {
  a12: number;
  b12: number;
  a21: number;
  b21: number;
  alpha: number;
}

/**
 * NRTL (Renon and Prausnitz, AIChE J. 14 (1968) 135), component 1 = A, 2 = B, x = x2:
 *   g = RT[x1 ln x1 + x2 ln x2] + RT x1 x2 [tau21 G21/(x1 + x2 G21) + tau12 G12/(x2 + x1 G12)]
 *   G_ij = exp(-alpha tau_ij)
 * Each bracket term is C x(1-x)/(p + r x):
 *   tau21 G21 x(1-x) / (1 + (G21 - 1) x)   and   tau12 G12 x(1-x) / (G12 + (1 - G12) x).
 */
export function nrtl(p: NrtlParameters): BinaryModel {
  for (const name of ['a12', 'b12', 'a21', 'b21', 'alpha'] as const) {
    if (!Number.isFinite(p[name])) fail('input', `NRTL parameter ${name} must be a finite number`);
  }
  if (!(p.alpha > 0)) fail('input', `NRTL alpha must be above 0 (typically 0.2 to 0.47; got ${p.alpha})`);
  const { a12, b12, a21, b21, alpha } = p;
  return {
    key: `NRTL:${a12},${b12},${a21},${b21},${alpha}`,
    at: (T) => new NrtlIsotherm(a12 + b12 / T, a21 + b21 / T, alpha, T),
  };
}

class NrtlIsotherm implements Isotherm {
  readonly RT: number;
  private readonly C1: number;
  private readonly p1: number;
  private readonly r1: number;
  private readonly C2: number;
  private readonly p2: number;
  private readonly r2: number;
  constructor(tau12: number, tau21: number, alpha: number, readonly T: number) {
    this.RT = R * T;
    const G12 = Math.exp(-alpha * tau12), G21 = Math.exp(-alpha * tau21);
    this.C1 = tau21 * G21; this.p1 = 1; this.r1 = G21 - 1;
    this.C2 = tau12 * G12; this.p2 = G12; this.r2 = 1 - G12;
  }

  /**
   * f = N/D with N = x y, D = p + r x, and its derivatives (N' = y - x, N'' = -2, N''' = 0;
   * (1/D)' = -r/D^2, (1/D)'' = 2r^2/D^3, (1/D)''' = -6r^3/D^4), order 0 to 3.
   */
  private static f(x: number, y: number, p: number, r: number, order: number): number {
    const N = x * y, N1 = y - x, E = 1 / (p + r * x), rE = r * E;
    switch (order) {
      case 0: return N * E;
      case 1: return E * (N1 - N * rE);
      case 2: return E * (-2 - 2 * N1 * rE + 2 * N * rE * rE);
      default: return E * (6 * rE + 6 * N1 * rE * rE - 6 * N * rE * rE * rE);
    }
  }

  private excess(x: number, y: number, order: number): number {
    const F = NrtlIsotherm.f;
    return this.RT * (this.C1 * F(x, y, this.p1, this.r1, order) + this.C2 * F(x, y, this.p2, this.r2, order));
  }

  g(x: number, y: number): number {
    const lx = x > 0 ? x * Math.log(x) : 0, ly = y > 0 ? y * Math.log(y) : 0;
    return this.RT * (lx + ly) + this.excess(x, y, 0);
  }

  dg(x: number, y: number): number {
    return this.RT * (Math.log(x) - Math.log(y)) + this.excess(x, y, 1);
  }

  dgRatio(u: number, x: number, y: number): number {
    return this.RT * u + this.excess(x, y, 1);
  }

  d2g(x: number, y: number): number {
    return this.RT / (x * y) + this.excess(x, y, 2);
  }

  d3g(x: number, y: number): number {
    return this.RT * (1 / (y * y) - 1 / (x * x)) + this.excess(x, y, 3);
  }

  curvatures(x: number, y: number, out: Float64Array): void {
    out[0] = this.d2g(x, y);
    out[1] = this.d3g(x, y);
  }

  curvatureEach(x: Float64Array, y: Float64Array, from: number, to: number, out: Float64Array): void {
    const RT = this.RT;
    for (let i = from; i < to; i++) out[i] = (x[i] * y[i] * this.d2g(x[i], y[i])) / RT;
  }

  /** No cheap bound of q for NRTL: Infinity (the callers sample). */
  curvatureCeiling(): number {
    return Infinity;
  }

  derivatives(x: number, y: number, out: Float64Array): void {
    const logX = Math.log(x), logY = Math.log(y);
    // the expressions of g, dg and d2g, term for term
    const lx = x > 0 ? x * logX : 0, ly = y > 0 ? y * logY : 0;
    out[0] = this.RT * (lx + ly) + this.excess(x, y, 0);
    out[1] = this.RT * (logX - logY) + this.excess(x, y, 1);
    out[2] = this.RT / (x * y) + this.excess(x, y, 2);
  }
}

/** Cards `model | nrtl`: tau_ij = a_ij + b_ij / T and alpha. */
export const nrtlFamily: ModelFamily = {
  name: 'nrtl',
  aliases: [],
  keys: ['a12', 'b12', 'a21', 'b21', 'alpha'],
  composition: 'mole fraction',
  keyRows: [
    { keys: ['a12', 'b12', 'a21', 'b21'], meaning: 'tau_ij = a_ij + b_ij / T (b in K); component 1 = A, 2 = B' },
    { keys: ['alpha'], meaning: 'non-randomness, G_ij = exp(-alpha tau_ij)' },
  ],
  fromCard(card) {
    const a12 = card.num('a12'), b12 = card.num('b12'), a21 = card.num('a21'), b21 = card.num('b21'), alpha = card.num('alpha');
    if (a12 === undefined && b12 === undefined) fail('input', `an nrtl card needs "a12" and/or "b12" (tau12 = a12 + b12 / T)`);
    if (a21 === undefined && b21 === undefined) fail('input', `an nrtl card needs "a21" and/or "b21" (tau21 = a21 + b21 / T)`);
    if (alpha === undefined) fail('input', `an nrtl card needs "alpha" (non-randomness, typically 0.2 to 0.47)`);
    return {
      model: nrtl({ a12: a12 ?? 0, b12: b12 ?? 0, a21: a21 ?? 0, b21: b21 ?? 0, alpha }),
      description: `NRTL, tau12 = ${a12 ?? 0} + ${b12 ?? 0}/T, tau21 = ${a21 ?? 0} + ${b21 ?? 0}/T, alpha = ${alpha} (T in K)`,
    };
  },
};
