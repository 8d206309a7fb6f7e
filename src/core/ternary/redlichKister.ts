/**
 * Redlich–Kister on each pair with Muggianu's extrapolation and a ternary term:
 *   g = RT sum_i x_i ln x_i
 *     + sum over pairs (i, j) in (A,B), (A,C), (B,C) of x_i x_j sum_k L_ij,k (x_i - x_j)^k
 *     + x_A x_B x_C (x_A M_A + x_B M_B + x_C M_C)
 * with L and M each a + b T + c T ln T. The pair order fixes the sign of odd terms: the edge (i, j)
 * is exactly the binary Redlich–Kister model with i as its A and j as its B.
 */
import { fail } from '../errors';
import type { RedlichKisterTerm } from '../models/redlichKister';
import { checkTerm, EA, EAA, EAB, EAC, EB, EBB, EBC, EC, ECC, EG, TernaryIsothermBase, termAt, type TemperatureTerm, type TernaryModel } from './model';

export interface TernaryRedlichKisterParameters {
  /** L_AB,k, L_AC,k, L_BC,k (k = 0, 1, ...); an empty list for a pair without interaction. */
  AB: readonly RedlichKisterTerm[];
  AC: readonly RedlichKisterTerm[];
  BC: readonly RedlichKisterTerm[];
  /** The ternary term M_A, M_B, M_C (absent: zero). A single constant M is M_A = M_B = M_C = M. */
  ternary?: { A: TemperatureTerm; B: TemperatureTerm; C: TemperatureTerm };
}

export function ternaryRedlichKister(p: TernaryRedlichKisterParameters): TernaryModel {
  const pairs = [p.AB, p.AC, p.BC].map((terms, n) => {
    const name = ['AB', 'AC', 'BC'][n];
    if (!Array.isArray(terms)) fail('input', `Redlich–Kister pair ${name}: give a list of terms (empty for none)`);
    terms.forEach((t, k) => checkTerm(t, `Redlich–Kister term L${k} of pair ${name}`));
    return terms.map((t) => ({ a: t.a, b: t.b, c: t.c }));
  });
  const zero = { a: 0, b: 0, c: 0 };
  const M = p.ternary ? [p.ternary.A, p.ternary.B, p.ternary.C].map((t) => ({ a: t.a, b: t.b, c: t.c })) : [zero, zero, zero];
  M.forEach((t, i) => checkTerm(t, `ternary term M_${'ABC'[i]}`));
  const text = (ts: readonly TemperatureTerm[]) => ts.map((t) => `${t.a},${t.b},${t.c}`).join(';');
  return {
    key: `RK3:${pairs.map(text).join('|')}|${text(M)}`,
    composition: 'mole fraction',
    sites: [1, 1, 1],
    at: (T) => {
      const L = pairs.map((ts) => Float64Array.from(ts, (t) => termAt(t, T)));
      return new RedlichKisterTernaryIsotherm(T, L[0], L[1], L[2], termAt(M[0], T), termAt(M[1], T), termAt(M[2], T));
    },
  };
}

/**
 * One pair term f = x_i x_j P(d), d = x_i - x_j, P(d) = sum_k L_k d^k:
 *   d_i f = x_j P + x_i x_j P',  d_j f = x_i P - x_i x_j P'
 *   d_ii f = 2 x_j P' + x_i x_j P'',  d_jj f = -2 x_i P' + x_i x_j P'',  d_ij f = P + d P' - x_i x_j P''
 * The ternary term t = p S with p = x_A x_B x_C, S = sum_i M_i x_i:
 *   d_i t = (p / x_i) S + p M_i,  d_ii t = 2 (p / x_i) M_i,  d_ij t = x_k S + (p / x_j) M_i + (p / x_i) M_j
 * (p / x_i is the product of the other two fractions, computed as such).
 */
class RedlichKisterTernaryIsotherm extends TernaryIsothermBase {
  private readonly pd = new Float64Array(3);
  constructor(
    T: number,
    private readonly LAB: Float64Array,
    private readonly LAC: Float64Array,
    private readonly LBC: Float64Array,
    private readonly MA: number,
    private readonly MB: number,
    private readonly MC: number,
  ) {
    super(T, 1, 1, 1);
  }

  private static pair(L: Float64Array, xi: number, xj: number): number {
    const d = xi - xj;
    let P = 0;
    for (let k = L.length - 1; k >= 0; k--) P = P * d + L[k];
    return xi * xj * P;
  }

  /** P, P', P'' at d into pd. */
  private horner(L: Float64Array, d: number): void {
    let P = 0, P1 = 0, H2 = 0; // H2 = P''/2
    for (let k = L.length - 1; k >= 0; k--) {
      H2 = H2 * d + P1;
      P1 = P1 * d + P;
      P = P * d + L[k];
    }
    this.pd[0] = P; this.pd[1] = P1; this.pd[2] = 2 * H2;
  }

  protected excessG(xA: number, xB: number, xC: number): number {
    const f = RedlichKisterTernaryIsotherm.pair;
    return f(this.LAB, xA, xB) + f(this.LAC, xA, xC) + f(this.LBC, xB, xC)
      + xA * xB * xC * (this.MA * xA + this.MB * xB + this.MC * xC);
  }

  protected excessLocal(xA: number, xB: number, xC: number, e: Float64Array): void {
    e.fill(0);
    // slots of d_i, d_j, d_ii, d_jj, d_ij for each pair
    this.addPair(e, this.LAB, xA, xB, EA, EB, EAA, EBB, EAB);
    this.addPair(e, this.LAC, xA, xC, EA, EC, EAA, ECC, EAC);
    this.addPair(e, this.LBC, xB, xC, EB, EC, EBB, ECC, EBC);
    const MA = this.MA, MB = this.MB, MC = this.MC;
    const pA = xB * xC, pB = xA * xC, pC = xA * xB, p = pC * xC;
    const S = MA * xA + MB * xB + MC * xC;
    e[EG] += p * S;
    e[EA] += pA * S + p * MA;
    e[EB] += pB * S + p * MB;
    e[EC] += pC * S + p * MC;
    e[EAA] += 2 * pA * MA;
    e[EBB] += 2 * pB * MB;
    e[ECC] += 2 * pC * MC;
    e[EAB] += xC * S + pB * MA + pA * MB;
    e[EAC] += xB * S + pC * MA + pA * MC;
    e[EBC] += xA * S + pC * MB + pB * MC;
  }

  private addPair(e: Float64Array, L: Float64Array, xi: number, xj: number, si: number, sj: number, sii: number, sjj: number, sij: number): void {
    if (L.length === 0) return;
    const d = xi - xj;
    this.horner(L, d);
    const P = this.pd[0], P1 = this.pd[1], P2 = this.pd[2], w = xi * xj;
    e[EG] += w * P;
    e[si] += xj * P + w * P1;
    e[sj] += xi * P - w * P1;
    e[sii] += 2 * xj * P1 + w * P2;
    e[sjj] += -2 * xi * P1 + w * P2;
    e[sij] += P + d * P1 - w * P2;
  }
}
