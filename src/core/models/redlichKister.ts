import { R } from '../constants';
import { fail } from '../errors';
import { signed, type CardValues, type ModelFamily } from '../family';
import type { BinaryModel, Isotherm } from '../model';

/** One Redlich–Kister term: L_k(T) = a + b T + c T ln T (a in J/mol, b and c in J/(mol K)). */
export interface RedlichKisterTerm {
  a: number;
  b: number;
  c: number;
}

/**
 * Redlich–Kister solution (the regular solution is the single term L0 = Omega):
 *   g = RT[x ln x + (1-x) ln(1-x)] + x(1-x) sum_k L_k(T) (1-2x)^k
 */
export function redlichKister(terms: readonly RedlichKisterTerm[]): BinaryModel {
  if (terms.length === 0) fail('input', 'a Redlich–Kister model needs at least one term (row L0)');
  terms.forEach((t, k) => {
    for (const name of ['a', 'b', 'c'] as const) {
      if (!Number.isFinite(t[name])) fail('input', `Redlich–Kister term L${k}: ${name} must be a finite number`);
    }
  });
  const frozen = terms.map((t) => ({ a: t.a, b: t.b, c: t.c }));
  const key = 'RK:' + frozen.map((t) => `${t.a},${t.b},${t.c}`).join(';');
  // ln T only when a term has a c T ln T part (the same L_k: c T ln T is then zero either way)
  const withLog = frozen.some((t) => t.c !== 0);
  const ceiling = new StretchCeiling(frozen);
  return {
    key,
    at: (T) => redlichKisterAt(frozen, T, withLog, ceiling),
  };
}

/** The regular solution: one temperature-independent interaction energy Omega (J/mol). */
export function regularSolution(omega: number): BinaryModel {
  return redlichKister([{ a: omega, b: 0, c: 0 }]);
}

/** The regular solution in words: "regular solution, omega = 21 kJ/mol" (omega in that unit). */
export function describeRegular(omega: number, energyName: string): string {
  return `regular solution, omega = ${omega} ${energyName}`;
}

/**
 * Redlich–Kister terms in words (a, b, c in the given energy unit): "Redlich–Kister, 2 terms:
 * L0 = 21.5 - 0.0042 T; L1 = 3.1 (kJ/mol, T in K)".
 */
export function describeRedlichKister(terms: readonly RedlichKisterTerm[], energyName: string): string {
  const n = terms.length;
  const words = terms.map((t, k) => `L${k} = ${t.a}${signed(t.b, 'T')}${signed(t.c, 'T ln T')}`);
  return `Redlich–Kister, ${n} term${n > 1 ? 's' : ''}: ${words.join('; ')} (${energyName}, T in K)`;
}

/** Cards `model | regular`: one interaction energy omega. */
export const regularFamily: ModelFamily = {
  name: 'regular',
  aliases: [],
  keys: ['omega'],
  composition: 'mole fraction',
  keyRows: [{ keys: ['omega'], meaning: 'interaction energy, in the card\'s energy unit' }],
  fromCard(card) {
    const omega = card.num('omega');
    if (omega === undefined) fail('input', 'a regular card needs "omega" (the interaction energy)');
    return { model: regularSolution(omega * card.energy.toJoulePerMole), description: describeRegular(omega, card.energy.name) };
  },
};

/** Key L<k> or L<k>.b / L<k>.c in any case (L<k>.a is L<k>), in our spelling. */
function termKey(raw: string): string | undefined {
  const m = /^l(\d+)(?:\.([abc]))?$/i.exec(raw);
  if (!m) return undefined;
  return m[2] && m[2].toLowerCase() !== 'a' ? `L${Number(m[1])}.${m[2].toLowerCase()}` : `L${Number(m[1])}`;
}

/** Cards `model | redlich-kister` (or rk): L0, L0.b, L0.c, L1, ... */
export const redlichKisterFamily: ModelFamily = {
  name: 'redlich-kister',
  aliases: ['rk'],
  keys: ['L0', 'L0.b', 'L0.c'],
  moreKeys: { canonical: termKey, note: 'L1, L2, ... for more terms' },
  composition: 'mole fraction',
  keyRows: [
    { keys: ['L0', 'L1', '...'], meaning: 'constant part a of L_k, energy unit' },
    { keys: ['L0.b', 'L0.c', '...'], meaning: 'b and c of L_k = a + b T + c T ln T, energy unit per K (T in K)' },
  ],
  fromCard(card: CardValues) {
    const orders = card.keys.filter((k) => termKey(k) === k).map((k) => Number(/^L(\d+)/.exec(k)![1]));
    if (orders.length === 0) fail('input', 'a redlich-kister card needs at least "L0"');
    const n = Math.max(...orders) + 1;
    const J = card.energy.toJoulePerMole;
    const given: RedlichKisterTerm[] = [];
    for (let k = 0; k < n; k++) {
      const a = card.num(`L${k}`), b = card.num(`L${k}.b`), c = card.num(`L${k}.c`);
      if (a === undefined && b === undefined && c === undefined) fail('input', `L${k} is missing while L${n - 1} is given: write L${k} | 0 for a term that is zero`);
      given.push({ a: a ?? 0, b: b ?? 0, c: c ?? 0 });
    }
    return {
      model: redlichKister(given.map((t) => ({ a: t.a * J, b: t.b * J, c: t.c * J }))),
      description: describeRedlichKister(given, card.energy.name),
    };
  },
};

function redlichKisterAt(terms: readonly RedlichKisterTerm[], T: number, withLog: boolean, ceiling: StretchCeiling): Isotherm {
  // A plain array of the exact length, of doubles from the start: one isotherm is made per row of
  // a sweep, and a typed array, or an array grown by push (which reserves 17 slots), costs far more
  // to allocate. An array literal for up to four terms, the usual case.
  const lnT = withLog ? Math.log(T) : 0;
  const n = terms.length;
  const L = n === 1 ? [termAt(terms[0], T, lnT)]
    : n === 2 ? [termAt(terms[0], T, lnT), termAt(terms[1], T, lnT)]
      : n === 3 ? [termAt(terms[0], T, lnT), termAt(terms[1], T, lnT), termAt(terms[2], T, lnT)]
        : n === 4 ? [termAt(terms[0], T, lnT), termAt(terms[1], T, lnT), termAt(terms[2], T, lnT), termAt(terms[3], T, lnT)]
          : terms.map((t) => termAt(t, T, lnT));
  return new RedlichKisterIsotherm(L, T, lnT, ceiling);
}

/** L_k(T) = a + b T + c T ln T. */
function termAt(t: RedlichKisterTerm, T: number, lnT: number): number {
  return t.a + t.b * T + t.c * T * lnT;
}

/**
 * The Redlich–Kister model at one temperature. With d = 1 - 2x = y - x, w = x y and
 * P(d) = sum_k L_k d^k (dd/dx = -2, dw/dx = d):
 *   g    = RT[x ln x + y ln y] + w P
 *   g'   = RT ln(x/y) + d P - 2 w P'
 *   g''  = RT/(x y) - 2P - 4 d P' + 4 w P''
 *   g''' = RT (1/y^2 - 1/x^2) + 12 P' + 12 d P'' - 8 w P'''
 * Each method runs Horner's scheme for P and the derivatives it needs on local variables
 * (the solvers call these in their inner loops).
 */
class RedlichKisterIsotherm implements Isotherm {
  readonly RT: number;
  constructor(
    private readonly L: readonly number[],
    readonly T: number,
    /** ln T where a term has a c part, else 0 (as L was computed). */
    private readonly lnT: number,
    private readonly ceiling: StretchCeiling,
  ) {
    this.RT = R * T;
  }

  g(x: number, y: number): number {
    const L = this.L, d = y - x;
    let P = 0;
    for (let k = L.length - 1; k >= 0; k--) P = P * d + L[k];
    return this.RT * (xlnx(x) + xlnx(y)) + x * y * P;
  }

  dg(x: number, y: number): number {
    const L = this.L, d = y - x;
    let P = 0, P1 = 0;
    for (let k = L.length - 1; k >= 0; k--) {
      P1 = P1 * d + P;
      P = P * d + L[k];
    }
    return this.RT * (Math.log(x) - Math.log(y)) + d * P - 2 * x * y * P1;
  }

  dgRatio(u: number, x: number, y: number): number {
    const L = this.L, d = y - x;
    let P = 0, P1 = 0;
    for (let k = L.length - 1; k >= 0; k--) {
      P1 = P1 * d + P;
      P = P * d + L[k];
    }
    return this.RT * u + d * P - 2 * x * y * P1;
  }

  d2g(x: number, y: number): number {
    const L = this.L, d = y - x;
    let P = 0, P1 = 0, H2 = 0; // H2 = P''/2
    for (let k = L.length - 1; k >= 0; k--) {
      H2 = H2 * d + P1;
      P1 = P1 * d + P;
      P = P * d + L[k];
    }
    return this.RT / (x * y) - 2 * P - 4 * d * P1 + 8 * x * y * H2;
  }

  derivatives(x: number, y: number, out: Float64Array): void {
    const L = this.L, d = y - x;
    let P = 0, P1 = 0, H2 = 0;
    for (let k = L.length - 1; k >= 0; k--) {
      H2 = H2 * d + P1;
      P1 = P1 * d + P;
      P = P * d + L[k];
    }
    const lx = Math.log(x), ly = Math.log(y);
    // the expressions of g, dg and d2g above, term for term (xlnx(x) is x ln x for x > 0, else 0)
    out[0] = this.RT * ((x > 0 ? x * lx : 0) + (y > 0 ? y * ly : 0)) + x * y * P;
    out[1] = this.RT * (lx - ly) + d * P - 2 * x * y * P1;
    out[2] = this.RT / (x * y) - 2 * P - 4 * d * P1 + 8 * x * y * H2;
  }

  d3g(x: number, y: number): number {
    const L = this.L, d = y - x;
    let P = 0, P1 = 0, H2 = 0, H3 = 0; // H2 = P''/2, H3 = P'''/6
    for (let k = L.length - 1; k >= 0; k--) {
      H3 = H3 * d + H2;
      H2 = H2 * d + P1;
      P1 = P1 * d + P;
      P = P * d + L[k];
    }
    return this.RT * (1 / (y * y) - 1 / (x * x)) + 12 * P1 + 24 * d * H2 - 48 * x * y * H3;
  }

  curvatures(x: number, y: number, out: Float64Array): void {
    const L = this.L, d = y - x;
    let P = 0, P1 = 0, H2 = 0, H3 = 0;
    for (let k = L.length - 1; k >= 0; k--) {
      H3 = H3 * d + H2;
      H2 = H2 * d + P1;
      P1 = P1 * d + P;
      P = P * d + L[k];
    }
    // the expressions of d2g and d3g above, term for term
    out[0] = this.RT / (x * y) - 2 * P - 4 * d * P1 + 8 * x * y * H2;
    out[1] = this.RT * (1 / (y * y) - 1 / (x * x)) + 12 * P1 + 24 * d * H2 - 48 * x * y * H3;
  }

  curvatureEach(x: Float64Array, y: Float64Array, from: number, to: number, out: Float64Array): void {
    const RT = this.RT;
    for (let i = from; i < to; i++) out[i] = (x[i] * y[i] * this.d2g(x[i], y[i])) / RT;
  }

  /** The model's StretchCeiling at this temperature. */
  curvatureCeiling(xa: number, ya: number, xb: number, yb: number): number {
    return this.ceiling.at(xa, ya, xb, yb, this.T, this.lnT);
  }
}

/**
 * curvatureCeiling of a Redlich–Kister model. With x y = (1 - d^2)/4, q = x y g''/RT is a
 * polynomial in d of degree m = n + 1 (n terms):
 *   q = 1 + (1 - d^2) E(d) / (4 RT),  E(d) = -2P - 4 d P' + (1 - d^2) P'' = sum_j (j+1)(j+2)(L_{j+2} - L_j) d^j,
 * and E is linear in the L_k = a_k + b_k T + c_k T ln T, so
 *   q - 1 = F_a(d) / T + F_b(d) + F_c(d) ln T,  F_p(d) = (1 - d^2) E(d; p) / (4 R)
 * with E(d; p) the E of the a (b, c) parts alone. Over the stretch d = d0 + h t, t in [0, 1],
 * between two compositions, q is at most its largest Bernstein coefficient (Farin, Curves and
 * Surfaces for CAGD, 5th ed., 2002, the convex-hull property); where that does not settle it, the
 * largest of the two halves' (one de Casteljau split). The Bernstein coefficients of F_a, F_b and
 * F_c on a stretch do not depend on T: they are kept for the last stretch asked for, and a row of a
 * sweep, whose stretch (between two grid nodes) changes only every hundred rows or so, combines them.
 * The allowance for rounding: every number here and in curvatureEach is at most 8^m s (s = 1 + the
 * sum of |coefficients| of q in d; with |d0| <= 1, |h| <= 2 the shift grows them by at most 4^m,
 * the change of basis by m + 1 <= 2^m, the split not at all), each operation rounds by at most
 * 2^-52 of that, and 2^-36 leaves a factor 2^16 for the number of operations (at most a few m^2)
 * and for x + y differing from 1 by rounding. Infinity beyond degree CEILING_DEGREE.
 */
class StretchCeiling {
  private readonly m: number;
  /** ALLOWANCE 8^m. */
  private readonly allowance: number;
  /** The coefficients of F_a, F_b, F_c in d, and the sums of their sizes. */
  private readonly power: Float64Array[];
  private readonly sizes: number[];
  /** The Bernstein coefficients of F_a, F_b, F_c on the stretch last asked for (xa, ya to xb, yb). */
  private readonly bernstein: Float64Array[];
  private xa = NaN;
  private ya = NaN;
  private xb = NaN;
  private yb = NaN;

  constructor(terms: readonly RedlichKisterTerm[]) {
    const n = terms.length, m = n + 1;
    this.m = m;
    this.allowance = ALLOWANCE * 8 ** m;
    this.power = [];
    this.sizes = [];
    this.bernstein = [];
    if (m > CEILING_DEGREE) return;
    for (const part of ['a', 'b', 'c'] as const) {
      const L = (k: number) => (k < n ? terms[k][part] : 0);
      const E = (j: number) => (j >= 0 && j < n ? (j + 1) * (j + 2) * (L(j + 2) - L(j)) : 0);
      const F = new Float64Array(m + 1);
      let size = 0;
      for (let j = 0; j <= m; j++) {
        F[j] = (E(j) - E(j - 2)) / (4 * R);
        size += Math.abs(F[j]);
      }
      this.power.push(F);
      this.sizes.push(size);
      this.bernstein.push(new Float64Array(m + 1));
    }
  }

  /** The bound at temperature T (lnT: ln T where the model has c parts, else 0). */
  at(xa: number, ya: number, xb: number, yb: number, T: number, lnT: number): number {
    const m = this.m;
    if (m > CEILING_DEGREE) return Infinity;
    if (!(xa === this.xa && ya === this.ya && xb === this.xb && yb === this.yb)) this.stretch(xa, ya, xb, yb);
    // the Bernstein coefficients of q - 1 at T
    const ba = this.bernstein[0], bb = this.bernstein[1], bc = this.bernstein[2], b = splitScratch;
    const w = 1 / T;
    let top = -Infinity;
    for (let i = 0; i <= m; i++) {
      b[i] = ba[i] * w + bb[i] + bc[i] * lnT;
      if (b[i] > top) top = b[i];
    }
    const allowance = this.allowance * (1 + this.sizes[0] * w + this.sizes[1] + this.sizes[2] * Math.abs(lnT));
    if (1 + top + allowance < 0 || !(top === top)) return 1 + top + allowance;
    // de Casteljau at t = 1/2: the left half's coefficients are the first of each level, the right half's the last
    let left = b[0], right = b[m];
    for (let level = 1; level <= m; level++) {
      for (let i = 0; i + level <= m; i++) b[i] = 0.5 * (b[i] + b[i + 1]);
      if (b[0] > left) left = b[0];
      if (b[m - level] > right) right = b[m - level];
    }
    return 1 + Math.max(left, right) + allowance;
  }

  /** The Bernstein coefficients of F_a, F_b, F_c on the stretch d = d0 + h t (d0 = yb - xb, d0 + h = ya - xa). */
  private stretch(xa: number, ya: number, xb: number, yb: number): void {
    const m = this.m, c = splitScratch;
    const d0 = yb - xb, h = ya - xa - d0;
    for (let p = 0; p < 3; p++) {
      c.set(this.power[p]);
      // shift to t: F(d0 + h t)
      for (let i = 0; i < m; i++) for (let j = m - 1; j >= i; j--) c[j] += d0 * c[j + 1];
      for (let j = 1, hj = h; j <= m; j++, hj *= h) c[j] *= hj;
      // b_i = sum_{j <= i} C(i, j) / C(m, j) c_j
      const out = this.bernstein[p];
      for (let i = 0; i <= m; i++) {
        let sum = 0;
        for (let j = 0; j <= i; j++) sum += (binomial(i, j) / binomial(m, j)) * c[j];
        out[i] = sum;
      }
    }
    this.xa = xa; this.ya = ya; this.xb = xb; this.yb = yb;
  }
}

/** The highest degree m (10 terms) given a bound: beyond it the allowance, 2^-36 8^m of the coefficients' size, is half of that or more, too wide to settle anything. */
const CEILING_DEGREE = 11;
/** The allowance for rounding, per 8^m of the coefficients' size (see StretchCeiling). */
const ALLOWANCE = 2 ** -36;
/** StretchCeiling's scratch (a shift, a split). */
const splitScratch = new Float64Array(CEILING_DEGREE + 1);

/** The binomial coefficient C(a, k). */
function binomial(a: number, k: number): number {
  let v = 1;
  for (let t = 0; t < k; t++) v = (v * (a - t)) / (t + 1);
  return v;
}

/** x ln x, with the limit 0 at x = 0. */
export function xlnx(x: number): number {
  return x > 0 ? x * Math.log(x) : 0;
}
