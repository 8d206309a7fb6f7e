/**
 * The interface of three-component models (components A, B, C), and what every one of them shares.
 *
 * A ternary model describes the molar Gibbs energy of mixing g(x, T) over the composition triangle
 * (mole fractions; volume fractions for Flory–Huggins, per mole of lattice sites). A composition
 * always travels as its three fractions (xA, xB, xC), each computed on its own, never one of them
 * as 1 - the others: a phase poor in one component (a polymer-lean phase with phi ~ 1e-40) keeps
 * every digit of it.
 *
 * The independent variables are (x_B, x_C), with x_A = 1 - x_B - x_C. A model answers g, its
 * gradient and Hessian in those, and the chemical potentials relative to the pure components
 *   mu_i = g + sum_j (delta_ij - x_j) dg/dx_j
 * (per mole of lattice sites for Flory–Huggins; `perMolecule` gives N_i mu_i).
 */
import { R } from '../constants';
import { fail } from '../errors';

export interface TernaryModel {
  /** A stable text that identifies the parameters, used as a cache key. */
  readonly key: string;
  /** What the fractions are. */
  readonly composition: 'mole fraction' | 'volume fraction';
  /** Lattice sites per molecule N_A, N_B, N_C (1, 1, 1 for mole-fraction models). */
  readonly sites: readonly [number, number, number];
  /** The model with its temperature-dependent parameters evaluated at T (kelvin, > 0). */
  at(T: number): TernaryIsotherm;
}

/** Slots of the array `local` fills. */
export const G = 0, GB = 1, GC = 2, HBB = 3, HBC = 4, HCC = 5, MUA = 6, MUB = 7, MUC = 8;
/** Length of the array `local` fills. */
export const LOCAL_SIZE = 9;

/** A ternary model at one temperature. Energies in J/mol (per mole of sites for Flory–Huggins). */
export interface TernaryIsotherm {
  readonly T: number;
  /** R T, J/mol. */
  readonly RT: number;
  /** g at (xA, xB, xC). A zero fraction is allowed here (x ln x -> 0). */
  g(xA: number, xB: number, xC: number): number;
  /**
   * Everything at one composition (all three fractions > 0), written into `out` (no allocation):
   * out[G] = g; out[GB], out[GC] = dg/dx_B, dg/dx_C; out[HBB], out[HBC], out[HCC] = the Hessian;
   * out[MUA], out[MUB], out[MUC] = mu_A, mu_B, mu_C.
   */
  local(xA: number, xB: number, xC: number, out: Float64Array): void;
  /**
   * Optional, for many points at once (the split's samples at each new T): the part of g/RT that
   * does not depend on T, sum_i w_i x_i ln x_i, at the first n points into out.
   */
  idealParts?(n: number, xA: Float64Array, xB: Float64Array, xC: Float64Array, out: Float64Array): void;
  /** Optional, with idealParts: g at the first n points from their ideal parts, the same bits as `g`. */
  gFromIdeal?(n: number, xA: Float64Array, xB: Float64Array, xC: Float64Array, ideal: Float64Array, out: Float64Array): void;
  /**
   * Optional: the parameters of g_E at this T as text; two isotherms of one model with the same
   * text have the same g_E (a Redlich–Kister card without T-dependent terms), which `excessParts`
   * then gives once for both.
   */
  readonly excessKey?: string;
  /** Optional, with excessKey: g_E at the first n points into out, so that RT * ideal + g_E is the same bits as `g`. */
  excessParts?(n: number, xA: Float64Array, xB: Float64Array, xC: Float64Array, out: Float64Array): void;
}

/** x ln x, with the limit 0 at x = 0. */
export function xlnx(x: number): number {
  return x > 0 ? x * Math.log(x) : 0;
}

/** Slots of the excess-part array a model fills: g_E, its full gradient and full Hessian. */
export const EG = 0, EA = 1, EB = 2, EC = 3, EAA = 4, EAB = 5, EAC = 6, EBB = 7, EBC = 8, ECC = 9;

/**
 * The shared part: an ideal term RT sum_i w_i x_i ln x_i (w_i = 1, or 1/N_i for Flory–Huggins) and
 * an excess part g_E given by the model as a function of all three fractions (its natural extension
 * off the triangle), with its full gradient and Hessian. Then
 *   dg/dx_B = d_B g - d_A g,  d2g/dx_B2 = H_BB - 2 H_AB + H_AA,  d2g/dx_B dx_C = H_BC - H_AB - H_AC + H_AA, ...
 *   mu_i = RT [w_i ln x_i + sum_j (w_i - w_j) x_j] + g_E + d_i g_E - sum_j x_j d_j g_E
 * (the ideal part of mu_i in closed form, using sum_j x_j = 1, so it is exact for w_i = 1).
 */
export abstract class TernaryIsothermBase implements TernaryIsotherm {
  readonly RT: number;
  private readonly e = new Float64Array(10);
  constructor(
    readonly T: number,
    private readonly wA: number,
    private readonly wB: number,
    private readonly wC: number,
  ) {
    this.RT = R * T;
  }

  /** g_E at (xA, xB, xC). */
  protected abstract excessG(xA: number, xB: number, xC: number): number;
  /** g_E, its gradient (d/dx_A, d/dx_B, d/dx_C) and Hessian into e (slots EG ... ECC). */
  protected abstract excessLocal(xA: number, xB: number, xC: number, e: Float64Array): void;

  g(xA: number, xB: number, xC: number): number {
    return this.RT * (this.wA * xlnx(xA) + this.wB * xlnx(xB) + this.wC * xlnx(xC)) + this.excessG(xA, xB, xC);
  }

  idealParts(n: number, xA: Float64Array, xB: Float64Array, xC: Float64Array, out: Float64Array): void {
    const wA = this.wA, wB = this.wB, wC = this.wC;
    for (let k = 0; k < n; k++) out[k] = wA * xlnx(xA[k]) + wB * xlnx(xB[k]) + wC * xlnx(xC[k]);
  }

  gFromIdeal(n: number, xA: Float64Array, xB: Float64Array, xC: Float64Array, ideal: Float64Array, out: Float64Array): void {
    // the operations of g in the same order: RT * (ideal part) + g_E
    const RT = this.RT;
    for (let k = 0; k < n; k++) out[k] = RT * ideal[k] + this.excessG(xA[k], xB[k], xC[k]);
  }

  excessParts(n: number, xA: Float64Array, xB: Float64Array, xC: Float64Array, out: Float64Array): void {
    for (let k = 0; k < n; k++) out[k] = this.excessG(xA[k], xB[k], xC[k]);
  }

  local(xA: number, xB: number, xC: number, out: Float64Array): void {
    const e = this.e, RT = this.RT, wA = this.wA, wB = this.wB, wC = this.wC;
    this.excessLocal(xA, xB, xC, e);
    const lA = Math.log(xA), lB = Math.log(xB), lC = Math.log(xC);
    out[G] = RT * (wA * xA * lA + wB * xB * lB + wC * xC * lC) + e[EG];
    out[GB] = RT * (wB * (lB + 1) - wA * (lA + 1)) + e[EB] - e[EA];
    out[GC] = RT * (wC * (lC + 1) - wA * (lA + 1)) + e[EC] - e[EA];
    const iA = (RT * wA) / xA;
    out[HBB] = (RT * wB) / xB + iA + e[EBB] - 2 * e[EAB] + e[EAA];
    out[HBC] = iA + e[EBC] - e[EAB] - e[EAC] + e[EAA];
    out[HCC] = (RT * wC) / xC + iA + e[ECC] - 2 * e[EAC] + e[EAA];
    const s = e[EG] - xA * e[EA] - xB * e[EB] - xC * e[EC];
    out[MUA] = RT * (wA * lA + (wA - wB) * xB + (wA - wC) * xC) + s + e[EA];
    out[MUB] = RT * (wB * lB + (wB - wA) * xA + (wB - wC) * xC) + s + e[EB];
    out[MUC] = RT * (wC * lC + (wC - wA) * xA + (wC - wB) * xB) + s + e[EC];
  }
}

/** Fails with a range error unless (xA, xB, xC) are three fractions > 0 summing to 1 within 1e-9. */
export function checkComposition(xA: number, xB: number, xC: number, what = 'the composition'): void {
  for (const [name, v] of [['A', xA], ['B', xB], ['C', xC]] as const) {
    if (!Number.isFinite(v)) fail('range', `${what}: x_${name} must be a finite number (got ${v})`);
    if (!(v > 0 && v < 1)) fail('range', `${what}: x_${name} = ${v} must lie strictly between 0 and 1`);
  }
  const sum = xA + xB + xC;
  if (!(Math.abs(sum - 1) <= 1e-9)) fail('range', `${what}: the fractions sum to ${sum}, not 1`);
}

/**
 * Chemical potentials per mole of molecules, N_i mu_i (what users mean for Flory–Huggins; the same
 * as mu_i for mole-fraction models), into out[0..2].
 */
const loc = new Float64Array(LOCAL_SIZE);

export function perMolecule(model: TernaryModel, iso: TernaryIsotherm, xA: number, xB: number, xC: number, out: Float64Array): void {
  iso.local(xA, xB, xC, loc);
  out[0] = model.sites[0] * loc[MUA];
  out[1] = model.sites[1] * loc[MUB];
  out[2] = model.sites[2] * loc[MUC];
}

/** L(T) = a + b T + c T ln T. */
export interface TemperatureTerm {
  a: number;
  b: number;
  c: number;
}

export function termAt(t: TemperatureTerm, T: number): number {
  return t.a + t.b * T + t.c * T * Math.log(T);
}

export function checkTerm(t: TemperatureTerm, what: string): void {
  for (const name of ['a', 'b', 'c'] as const) {
    if (!Number.isFinite(t[name])) fail('input', `${what}: ${name} must be a finite number`);
  }
}
