import { R } from '../constants';
import { fail } from '../errors';
import type { ModelFamily } from '../family';
import type { BinaryModel, Isotherm } from '../model';

/** Flory–Huggins parameters: chain lengths (lattice sites per molecule) and chi(T) = A + B/T. */
export interface FloryHugginsParameters {
  NA: number;
  NB: number;
  /** chi = A + B / T: A dimensionless, B in K. */
  A: number;
  B: number;
}

/**
 * Flory–Huggins lattice solution, per mole of lattice sites; composition phi = volume fraction of B:
 *   g    = RT[(phi/N_B) ln phi + ((1-phi)/N_A) ln(1-phi) + chi phi (1-phi)]
 *   g'   = RT[(ln phi + 1)/N_B - (ln(1-phi) + 1)/N_A + chi (1 - 2 phi)]
 *   g''  = RT[1/(N_B phi) + 1/(N_A (1-phi)) - 2 chi]
 *   g''' = RT[1/(N_A (1-phi)^2) - 1/(N_B phi^2)]
 */
export function floryHuggins(p: FloryHugginsParameters): BinaryModel {
  for (const name of ['NA', 'NB'] as const) {
    if (!(Number.isFinite(p[name]) && p[name] >= 1)) fail('input', `Flory–Huggins chain length ${name} must be a number >= 1 (got ${p[name]})`);
  }
  for (const name of ['A', 'B'] as const) {
    if (!Number.isFinite(p[name])) fail('input', `Flory–Huggins chi term ${name} must be a finite number`);
  }
  const { NA, NB, A, B } = p;
  return {
    key: `FH:${NA},${NB},${A},${B}`,
    sites: { A: NA, B: NB }, // g is per mole of sites; a molecule of A (B) occupies N_A (N_B) of them
    at: (T) => new FloryHugginsIsotherm(NA, NB, A + B / T, T),
  };
}

/** chi(T) = A + B/T. */
export function chiAt(p: Pick<FloryHugginsParameters, 'A' | 'B'>, T: number): number {
  return p.A + p.B / T;
}

class FloryHugginsIsotherm implements Isotherm {
  readonly RT: number;
  constructor(
    private readonly NA: number,
    private readonly NB: number,
    private readonly chi: number,
    readonly T: number,
  ) {
    this.RT = R * T;
  }

  g(x: number, y: number): number {
    const lx = x > 0 ? x * Math.log(x) : 0, ly = y > 0 ? y * Math.log(y) : 0;
    return this.RT * (lx / this.NB + ly / this.NA + this.chi * x * y);
  }

  dg(x: number, y: number): number {
    return this.RT * ((Math.log(x) + 1) / this.NB - (Math.log(y) + 1) / this.NA + this.chi * (y - x));
  }

  /** ln x and ln y enter with different weights: no shortcut. */
  dgRatio(_u: number, x: number, y: number): number {
    return this.dg(x, y);
  }

  d2g(x: number, y: number): number {
    return this.RT * (1 / (this.NB * x) + 1 / (this.NA * y) - 2 * this.chi);
  }

  derivatives(x: number, y: number, out: Float64Array): void {
    const logX = Math.log(x), logY = Math.log(y);
    // the expressions of g, dg and d2g, term for term
    const lx = x > 0 ? x * logX : 0, ly = y > 0 ? y * logY : 0;
    out[0] = this.RT * (lx / this.NB + ly / this.NA + this.chi * x * y);
    out[1] = this.RT * ((logX + 1) / this.NB - (logY + 1) / this.NA + this.chi * (y - x));
    out[2] = this.RT * (1 / (this.NB * x) + 1 / (this.NA * y) - 2 * this.chi);
  }

  d3g(x: number, y: number): number {
    return this.RT * (1 / (this.NA * y * y) - 1 / (this.NB * x * x));
  }

  curvatures(x: number, y: number, out: Float64Array): void {
    out[0] = this.d2g(x, y);
    out[1] = this.d3g(x, y);
  }

  curvatureEach(x: Float64Array, y: Float64Array, from: number, to: number, out: Float64Array): void {
    const RT = this.RT;
    for (let i = from; i < to; i++) out[i] = (x[i] * y[i] * this.d2g(x[i], y[i])) / RT;
  }

  /**
   * q = x y g''/RT = y/N_B + x/N_A - 2 chi x y is a quadratic in x, convex for chi >= 0: at most
   * its larger end value on any stretch. The allowance: the rounding of curvatureEach's q (and of
   * this) is a few 2^-53 of 1/N_A + 1/N_B + 2 |chi|; 2^-40 of it leaves a wide factor. For chi < 0
   * q is positive everywhere: no bound needed (Infinity).
   */
  curvatureCeiling(xa: number, ya: number, xb: number, yb: number): number {
    const { NA, NB, chi } = this;
    if (!(chi >= 0)) return Infinity;
    const qa = ya / NB + xa / NA - 2 * chi * xa * ya, qb = yb / NB + xb / NA - 2 * chi * xb * yb;
    return Math.max(qa, qb) + 2 ** -40 * (1 + 1 / NA + 1 / NB + 2 * chi);
  }
}

/** Cards `model | flory-huggins` (or fh): chain lengths NA, NB and chi = chi.A + chi.B / T. */
export const floryHugginsFamily: ModelFamily = {
  name: 'flory-huggins',
  aliases: ['fh'],
  keys: ['NA', 'NB', 'chi.A', 'chi.B'],
  composition: 'volume fraction',
  keyRows: [
    { keys: ['NA', 'NB'], meaning: 'chain lengths in lattice sites (1 for a solvent)' },
    { keys: ['chi.A', 'chi.B'], meaning: 'chi = chi.A + chi.B / T (chi.B in K)' },
  ],
  fromCard(card) {
    const NA = card.num('NA'), NB = card.num('NB'), A = card.num('chi.A'), B = card.num('chi.B');
    if (NA === undefined || NB === undefined) fail('input', `a flory-huggins card needs "NA" and "NB" (chain lengths; 1 for a solvent)`);
    if (A === undefined && B === undefined) fail('input', `a flory-huggins card needs "chi.A" and/or "chi.B" (chi = chi.A + chi.B / T, T in K)`);
    return {
      model: floryHuggins({ NA, NB, A: A ?? 0, B: B ?? 0 }),
      description: `Flory–Huggins, NA = ${NA}, NB = ${NB}, chi = ${A ?? 0} + ${B ?? 0}/T (T in K)`,
    };
  },
};
