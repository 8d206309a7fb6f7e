/**
 * Redlich–Kister on each pair with Muggianu's extrapolation and a ternary term:
 *   g = RT sum_i x_i ln x_i
 *     + sum over pairs (i, j) in (A,B), (A,C), (B,C) of x_i x_j sum_k L_ij,k (x_i - x_j)^k
 *     + x_A x_B x_C (x_A M_A + x_B M_B + x_C M_C)
 * with L and M each a + b T + c T ln T. The pair order fixes the sign of odd terms: the edge (i, j)
 * is exactly the binary Redlich–Kister model with i as its A and j as its B.
 */
import { fail } from '../errors';
import { signed, type CardValues } from '../family';
import type { RedlichKisterTerm } from '../models/redlichKister';
import { pairKey, PAIRS, refuseBoth, type TernaryFamily } from './family';
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

  private excessText: string | undefined;

  /** The values of every L and M at this T (a card without .b and .c terms: the same at every T). */
  get excessKey(): string {
    this.excessText ??= [...this.LAB, '|', ...this.LAC, '|', ...this.LBC, '|', this.MA, this.MB, this.MC].join(',');
    return this.excessText;
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

/** `L<k>` or `L<k>.b` / `L<k>.c` (any case; `.a` is the plain key) after a pair prefix. */
function termRest(rest: string): string | undefined {
  const m = /^l(\d+)(?:\.([abc]))?$/i.exec(rest);
  if (!m) return undefined;
  return m[2] && m[2].toLowerCase() !== 'a' ? `L${Number(m[1])}.${m[2].toLowerCase()}` : `L${Number(m[1])}`;
}

/** `ABC.M`, `ABC.MA`, `ABC.MB`, `ABC.MC`, each optionally with `.b` or `.c` (any case). */
function ternaryTermKey(raw: string): string | undefined {
  const m = /^abc\.m([abc]?)(?:\.([abc]))?$/i.exec(raw.trim());
  if (!m) return undefined;
  const which = m[1].toUpperCase();
  return m[2] && m[2].toLowerCase() !== 'a' ? `ABC.M${which}.${m[2].toLowerCase()}` : `ABC.M${which}`;
}

const temperatureTerm = (t: TemperatureTerm) => `${t.a}${signed(t.b, 'T')}${signed(t.c, 'T ln T')}`;

/** Cards `model | redlich-kister` with pair-prefixed terms: AB.L0, AB.L1.b, AC.L0, BC.L0, ABC.M, ... */
export const ternaryRedlichKisterFamily: TernaryFamily = {
  name: 'redlich-kister',
  aliases: ['rk'],
  keys: ['AB.L0', 'AB.L0.b', 'AB.L0.c', 'AC.L0', 'BC.L0', 'ABC.M', 'ABC.MA', 'ABC.MB', 'ABC.MC'],
  canonical(raw) {
    const p = pairKey(raw);
    if (p) {
      const rest = termRest(p.rest);
      return rest === undefined ? undefined : `${p.pair}.${rest}`;
    }
    return ternaryTermKey(raw);
  },
  note: 'AB.L1, AC.L2.b, ... for more terms of a pair; ABC.M (.b, .c) or ABC.MA, ABC.MB, ABC.MC for the ternary term',
  composition: 'mole fraction',
  keyRows: [
    { keys: ['AB.L0', 'AB.L1', '...', 'AC.L0', '...', 'BC.L0', '...'], meaning: 'constant part a of L_k of each pair (the binary card\'s L_k), energy unit; every pair needs at least its L0 (0 for an ideal pair)' },
    { keys: ['AB.L0.b', 'AB.L0.c', '...'], meaning: 'b and c of L_k = a + b T + c T ln T of a pair, energy unit per K (T in K)' },
    { keys: ['ABC.M', 'ABC.M.b', 'ABC.M.c'], meaning: 'one ternary term M = M_A = M_B = M_C (a + b T + c T ln T), energy unit; optional' },
    { keys: ['ABC.MA', 'ABC.MB', 'ABC.MC'], meaning: 'or three ternary terms M_A, M_B, M_C (all three, each with .b and .c if needed), energy unit' },
  ],
  fromCard(card: CardValues) {
    const J = card.energy.toJoulePerMole;
    const terms = PAIRS.map((pair) => {
      const more = card.keys.filter((k) => k.startsWith(`${pair}.L`)).map((k) => Number(/^..\.L(\d+)/.exec(k)![1]));
      if (more.length === 0) fail('input', `a ternary redlich-kister card needs "${pair}.L0" (write ${pair}.L0 | 0 for a pair without interaction)`);
      const n = Math.max(...more) + 1;
      const list: RedlichKisterTerm[] = [];
      for (let k = 0; k < n; k++) {
        const a = card.num(`${pair}.L${k}`), b = card.num(`${pair}.L${k}.b`), c = card.num(`${pair}.L${k}.c`);
        if (a === undefined && b === undefined && c === undefined) fail('input', `"${pair}.L${k}" is missing while "${pair}.L${n - 1}" is given: write ${pair}.L${k} | 0 for a term that is zero`);
        list.push({ a: a ?? 0, b: b ?? 0, c: c ?? 0 });
      }
      return list;
    });
    const one = ['ABC.M', 'ABC.M.b', 'ABC.M.c'];
    const three = ['A', 'B', 'C'].flatMap((i) => [`ABC.M${i}`, `ABC.M${i}.b`, `ABC.M${i}.c`]);
    refuseBoth(card, one, three, 'ABC.M is one term for M_A = M_B = M_C');
    const termOf = (k: string): TemperatureTerm | undefined => {
      const a = card.num(k), b = card.num(`${k}.b`), c = card.num(`${k}.c`);
      return a === undefined && b === undefined && c === undefined ? undefined : { a: a ?? 0, b: b ?? 0, c: c ?? 0 };
    };
    let M: [TemperatureTerm, TemperatureTerm, TemperatureTerm] | undefined;
    const single = termOf('ABC.M');
    if (single) M = [single, single, single];
    else {
      const each = ['A', 'B', 'C'].map((i) => termOf(`ABC.M${i}`));
      const given = each.findIndex((t) => t !== undefined);
      if (given >= 0) {
        const missing = each.findIndex((t) => t === undefined);
        if (missing >= 0) fail('input', `"ABC.M${'ABC'[missing]}" is missing while "ABC.M${'ABC'[given]}" is given: give all three of ABC.MA, ABC.MB, ABC.MC (0 for none), or one ABC.M`);
        M = each as [TemperatureTerm, TemperatureTerm, TemperatureTerm];
      }
    }
    const scale = (t: TemperatureTerm) => ({ a: t.a * J, b: t.b * J, c: t.c * J });
    const model = ternaryRedlichKister({
      AB: terms[0].map(scale), AC: terms[1].map(scale), BC: terms[2].map(scale),
      ...(M ? { ternary: { A: scale(M[0]), B: scale(M[1]), C: scale(M[2]) } } : {}),
    });
    const pairWords = PAIRS.map((pair, n) => `${pair}: ${terms[n].map((t, k) => `L${k} = ${temperatureTerm(t)}`).join(', ')}`);
    const ternaryWords = !M ? 'no ternary term'
      : single ? `ABC: M = ${temperatureTerm(single)}`
      : `ABC: MA = ${temperatureTerm(M[0])}, MB = ${temperatureTerm(M[1])}, MC = ${temperatureTerm(M[2])}`;
    return { model, description: `ternary Redlich–Kister (Muggianu), ${pairWords.join('; ')}; ${ternaryWords} (${card.energy.name}, T in K)` };
  },
};
