/**
 * The spec's formulas (../../../../shared/spec/thermodynamics.md), written out again here from the
 * spec and nothing else, so the tests measure the core against the definitions and not against
 * itself. Nothing in this file imports from src/.
 *
 * Compositions come as (x, y) with y = 1 - x given separately, as the core takes them, so that
 * dilute boundaries near x = 1 keep their precision.
 */

/** R from the spec: CODATA 2018, exact by the 2019 SI definitions. */
export const R_SPEC = 8.314462618;
/** The same number as text, for symbolic expressions. */
export const R_TEXT = '8.314462618';

export interface RkTerm { a: number; b: number; c: number }
export interface FhParams { NA: number; NB: number; A: number; B: number }
export interface NrtlParams { a12: number; b12: number; a21: number; b21: number; alpha: number }

/** L_k(T) = a_k + b_k T + c_k T ln T. */
export function rkL(terms: readonly RkTerm[], T: number): number[] {
  return terms.map((t) => t.a + t.b * T + t.c * T * Math.log(T));
}

const xlnx = (x: number) => (x > 0 ? x * Math.log(x) : 0);

/**
 * Redlich–Kister, term by term (no shared recurrence with the core), with d = 1 - 2x = y - x and
 * w = x y. Derivatives of one term w d^k (dd/dx = -2, dw/dx = d):
 *   (w d^k)'  = d^(k+1) - 2k w d^(k-1)
 *   (w d^k)'' = -(4k+2) d^k + 4k(k-1) w d^(k-2)
 */
export function rkG(terms: readonly RkTerm[], T: number, x: number, y: number): number {
  const L = rkL(terms, T), d = y - x;
  let excess = 0;
  L.forEach((Lk, k) => { excess += Lk * x * y * d ** k; });
  return R_SPEC * T * (xlnx(x) + xlnx(y)) + excess;
}

export function rkDg(terms: readonly RkTerm[], T: number, x: number, y: number): number {
  const L = rkL(terms, T), d = y - x, w = x * y;
  let excess = 0;
  L.forEach((Lk, k) => { excess += Lk * (d ** (k + 1) - (k > 0 ? 2 * k * w * d ** (k - 1) : 0)); });
  return R_SPEC * T * (Math.log(x) - Math.log(y)) + excess;
}

export function rkD2g(terms: readonly RkTerm[], T: number, x: number, y: number): number {
  const L = rkL(terms, T), d = y - x, w = x * y;
  let excess = 0;
  L.forEach((Lk, k) => { excess += Lk * (-(4 * k + 2) * d ** k + (k > 1 ? 4 * k * (k - 1) * w * d ** (k - 2) : 0)); });
  return (R_SPEC * T) / (x * y) + excess;
}

/** Flory–Huggins per mole of lattice sites, x = phi (volume fraction of B). */
export function fhG(p: FhParams, T: number, x: number, y: number): number {
  const chi = p.A + p.B / T;
  return R_SPEC * T * (xlnx(x) / p.NB + xlnx(y) / p.NA + chi * x * y);
}

/** NRTL, component 1 = A (x1 = y), 2 = B (x2 = x). */
export function nrtlG(p: NrtlParams, T: number, x: number, y: number): number {
  const tau12 = p.a12 + p.b12 / T, tau21 = p.a21 + p.b21 / T;
  const G12 = Math.exp(-p.alpha * tau12), G21 = Math.exp(-p.alpha * tau21);
  const x1 = y, x2 = x;
  return R_SPEC * T * (xlnx(x1) + xlnx(x2))
    + R_SPEC * T * x1 * x2 * ((tau21 * G21) / (x1 + x2 * G21) + (tau12 * G12) / (x2 + x1 * G12));
}

/** A number as exact decimal text (a double has a finite decimal expansion), bracketed for a formula. */
export function num(v: number): string {
  return `(${v === 0 ? '0' : v.toPrecision(100).replace(/\.?0+(e|$)/, '$1')})`;
}

/**
 * The spec's g as mathjs text in x (and T), split into its ideal and excess parts so that the
 * tests can scale tolerances by the size of each part.
 */
export interface GText { ideal: string; excess: string }

export function rkText(terms: readonly RkTerm[]): GText {
  const parts = terms.map((t, k) => {
    const L = `(${num(t.a)} + ${num(t.b)}*T + ${num(t.c)}*T*log(T))`;
    // (1-2x)^k as a product: the power rule would leave 0 * 0^(-1) = NaN at x = 1/2.
    const power = '*(1 - 2*x)'.repeat(k);
    return `${L}${power}`;
  });
  return {
    ideal: `${R_TEXT}*T*(x*log(x) + (1 - x)*log(1 - x))`,
    excess: `x*(1 - x)*(${parts.join(' + ')})`,
  };
}

export function fhText(p: FhParams): GText {
  return {
    ideal: `${R_TEXT}*T*((x/${num(p.NB)})*log(x) + ((1 - x)/${num(p.NA)})*log(1 - x))`,
    excess: `${R_TEXT}*T*(${num(p.A)} + ${num(p.B)}/T)*x*(1 - x)`,
  };
}

export function nrtlText(p: NrtlParams): GText {
  const tau12 = `(${num(p.a12)} + ${num(p.b12)}/T)`, tau21 = `(${num(p.a21)} + ${num(p.b21)}/T)`;
  const G12 = `exp(-${num(p.alpha)}*${tau12})`, G21 = `exp(-${num(p.alpha)}*${tau21})`;
  return {
    ideal: `${R_TEXT}*T*((1 - x)*log(1 - x) + x*log(x))`,
    excess: `${R_TEXT}*T*(1 - x)*x*(${tau21}*${G21}/((1 - x) + x*${G21}) + ${tau12}*${G12}/(x + (1 - x)*${G12}))`,
  };
}
