/**
 * NRTL for three components, multicomponent form (Renon and Prausnitz, AIChE J. 14 (1968) 135),
 * numbering 1 = A, 2 = B, 3 = C:
 *   g/RT = sum_i x_i ln x_i + sum_i x_i (sum_j tau_ji G_ji x_j) / (sum_k G_ki x_k)
 *   G_ji = exp(-alpha_ji tau_ji), alpha_ji = alpha_ij, tau_ii = 0, tau_ij = a_ij + b_ij / T.
 * The edge (i, j) with the third component absent is the binary NRTL model with i as its component 1.
 */
import { fail } from '../errors';
import type { CardValues } from '../family';
import { pairKey, PAIRS, type TernaryFamily } from './family';
import { EA, EAA, EAB, EAC, EB, EBB, EBC, EC, ECC, EG, TernaryIsothermBase, type TernaryModel } from './model';

/** tau_ij = a_ij + b_ij / T (a dimensionless, b in K) for i != j, and alpha per pair. */
export interface TernaryNrtlParameters {
  a12: number; b12: number; a21: number; b21: number;
  a13: number; b13: number; a31: number; b31: number;
  a23: number; b23: number; a32: number; b32: number;
  alpha12: number; alpha13: number; alpha23: number;
}

const NAMES = ['a12', 'b12', 'a21', 'b21', 'a13', 'b13', 'a31', 'b31', 'a23', 'b23', 'a32', 'b32', 'alpha12', 'alpha13', 'alpha23'] as const;

export function ternaryNrtl(p: TernaryNrtlParameters): TernaryModel {
  for (const name of NAMES) {
    if (!Number.isFinite(p[name])) fail('input', `NRTL parameter ${name} must be a finite number`);
  }
  for (const name of ['alpha12', 'alpha13', 'alpha23'] as const) {
    if (!(p[name] > 0)) fail('input', `NRTL ${name} must be above 0 (typically 0.2 to 0.47; got ${p[name]})`);
  }
  const v = NAMES.map((n) => p[n]);
  return {
    key: `NRTL3:${v.join(',')}`,
    composition: 'mole fraction',
    sites: [1, 1, 1],
    at: (T) => {
      // tau[j * 3 + i] = tau_ji, G likewise
      const tau = new Float64Array(9), Gm = new Float64Array(9);
      const set = (j: number, i: number, a: number, b: number, alpha: number) => {
        tau[j * 3 + i] = a + b / T;
        Gm[j * 3 + i] = Math.exp(-alpha * tau[j * 3 + i]);
      };
      for (let i = 0; i < 3; i++) Gm[i * 4] = 1;
      set(0, 1, p.a12, p.b12, p.alpha12); set(1, 0, p.a21, p.b21, p.alpha12);
      set(0, 2, p.a13, p.b13, p.alpha13); set(2, 0, p.a31, p.b31, p.alpha13);
      set(1, 2, p.a23, p.b23, p.alpha23); set(2, 1, p.a32, p.b32, p.alpha23);
      return new NrtlTernaryIsotherm(T, tau, Gm);
    },
  };
}

/**
 * With S_i = sum_j tau_ji G_ji x_j, D_i = sum_k G_ki x_k, F_i = S_i / D_i, g_E/RT = sum_i x_i F_i and
 * d_m F_i = G_mi (tau_mi - F_i) / D_i:
 *   d_m g_E/RT = F_m + sum_i x_i G_mi (tau_mi - F_i) / D_i
 *   d_m d_n g_E/RT = G_nm (tau_nm - F_m) / D_m + G_mn (tau_mn - F_n) / D_n
 *                    - sum_i x_i G_mi G_ni (tau_mi + tau_ni - 2 F_i) / D_i^2
 */
class NrtlTernaryIsotherm extends TernaryIsothermBase {
  private readonly x = new Float64Array(3);
  private readonly F = new Float64Array(3);
  private readonly D = new Float64Array(3);
  constructor(T: number, private readonly tau: Float64Array, private readonly Gm: Float64Array) {
    super(T, 1, 1, 1);
  }

  /** F_i and D_i at x. */
  private fill(xA: number, xB: number, xC: number): void {
    const x = this.x, tau = this.tau, Gm = this.Gm;
    x[0] = xA; x[1] = xB; x[2] = xC;
    for (let i = 0; i < 3; i++) {
      let S = 0, D = 0;
      for (let j = 0; j < 3; j++) {
        const G = Gm[j * 3 + i];
        S += tau[j * 3 + i] * G * x[j];
        D += G * x[j];
      }
      this.D[i] = D;
      this.F[i] = S / D;
    }
  }

  protected excessG(xA: number, xB: number, xC: number): number {
    this.fill(xA, xB, xC);
    return this.RT * (xA * this.F[0] + xB * this.F[1] + xC * this.F[2]);
  }

  private grad(m: number): number {
    const x = this.x, F = this.F, D = this.D, tau = this.tau, Gm = this.Gm;
    let s = F[m];
    for (let i = 0; i < 3; i++) s += (x[i] * Gm[m * 3 + i] * (tau[m * 3 + i] - F[i])) / D[i];
    return s;
  }

  private hess(m: number, n: number): number {
    const x = this.x, F = this.F, D = this.D, tau = this.tau, Gm = this.Gm;
    let s = (Gm[n * 3 + m] * (tau[n * 3 + m] - F[m])) / D[m] + (Gm[m * 3 + n] * (tau[m * 3 + n] - F[n])) / D[n];
    for (let i = 0; i < 3; i++) {
      s -= (x[i] * Gm[m * 3 + i] * Gm[n * 3 + i] * (tau[m * 3 + i] + tau[n * 3 + i] - 2 * F[i])) / (D[i] * D[i]);
    }
    return s;
  }

  protected excessLocal(xA: number, xB: number, xC: number, e: Float64Array): void {
    this.fill(xA, xB, xC);
    const RT = this.RT;
    e[EG] = RT * (xA * this.F[0] + xB * this.F[1] + xC * this.F[2]);
    e[EA] = RT * this.grad(0); e[EB] = RT * this.grad(1); e[EC] = RT * this.grad(2);
    e[EAA] = RT * this.hess(0, 0); e[EAB] = RT * this.hess(0, 1); e[EAC] = RT * this.hess(0, 2);
    e[EBB] = RT * this.hess(1, 1); e[EBC] = RT * this.hess(1, 2); e[ECC] = RT * this.hess(2, 2);
  }
}

/** `a12`, `b12`, `a21`, `b21`, `alpha` (any case) after a pair prefix: the binary NRTL card's keys. */
function nrtlRest(rest: string): string | undefined {
  const r = rest.trim().toLowerCase();
  return ['a12', 'b12', 'a21', 'b21', 'alpha'].includes(r) ? r : undefined;
}

/**
 * Cards `model | nrtl` with each pair's binary NRTL keys behind its prefix: in the pair (i, j),
 * component 1 is i and 2 is j, so AC.a21 is a_31 and BC.b12 is b_23.
 */
export const ternaryNrtlFamily: TernaryFamily = {
  name: 'nrtl',
  aliases: [],
  keys: PAIRS.flatMap((p) => ['a12', 'b12', 'a21', 'b21', 'alpha'].map((k) => `${p}.${k}`)),
  canonical(raw) {
    const p = pairKey(raw);
    const rest = p && nrtlRest(p.rest);
    return p && rest ? `${p.pair}.${rest}` : undefined;
  },
  note: 'each pair AB, AC, BC has the binary keys a12, b12, a21, b21, alpha behind its prefix',
  composition: 'mole fraction',
  keyRows: [
    { keys: ['AB.a12', 'AB.b12', 'AB.a21', 'AB.b21'], meaning: 'tau_ij = a_ij + b_ij / T (b in K) of the pair A–B: 1 = A, 2 = B (likewise the pair A–C: 1 = A, 2 = C; B–C: 1 = B, 2 = C)' },
    { keys: ['AB.alpha', 'AC.alpha', 'BC.alpha'], meaning: 'non-randomness of each pair, G_ij = exp(-alpha tau_ij)' },
  ],
  fromCard(card: CardValues) {
    const v: Record<string, number> = {};
    const words: string[] = [];
    for (const pair of PAIRS) {
      const n = (k: string) => card.num(`${pair}.${k}`);
      const a12 = n('a12'), b12 = n('b12'), a21 = n('a21'), b21 = n('b21'), alpha = n('alpha');
      if (a12 === undefined && b12 === undefined) fail('input', `a ternary nrtl card needs "${pair}.a12" and/or "${pair}.b12" (tau12 = a12 + b12 / T of the pair ${pair[0]}–${pair[1]})`);
      if (a21 === undefined && b21 === undefined) fail('input', `a ternary nrtl card needs "${pair}.a21" and/or "${pair}.b21" (tau21 = a21 + b21 / T of the pair ${pair[0]}–${pair[1]})`);
      if (alpha === undefined) fail('input', `a ternary nrtl card needs "${pair}.alpha" (non-randomness of the pair ${pair[0]}–${pair[1]}, typically 0.2 to 0.47)`);
      const [i, j] = [1 + 'ABC'.indexOf(pair[0]), 1 + 'ABC'.indexOf(pair[1])];
      v[`a${i}${j}`] = a12 ?? 0; v[`b${i}${j}`] = b12 ?? 0; v[`a${j}${i}`] = a21 ?? 0; v[`b${j}${i}`] = b21 ?? 0; v[`alpha${i}${j}`] = alpha;
      words.push(`${pair}: tau12 = ${a12 ?? 0} + ${b12 ?? 0}/T, tau21 = ${a21 ?? 0} + ${b21 ?? 0}/T, alpha = ${alpha}`);
    }
    return { model: ternaryNrtl(v as unknown as TernaryNrtlParameters), description: `ternary NRTL, ${words.join('; ')} (T in K)` };
  },
};
