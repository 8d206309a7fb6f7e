/**
 * Redlich–Kister coefficients from measured tie-lines (T, x', x''): the two coexisting
 * compositions of a miscibility gap at temperature T.
 *
 * At each tie-line the chemical potentials are equal in both phases (spec: binodal),
 *   mu_A(x') = mu_A(x''),  mu_B(x') = mu_B(x''),
 * and with mu_A = RT ln y + sum_k L_k pA_k(x), mu_B = RT ln x + sum_k L_k pB_k(x) these read
 *   sum_k L_k(T) [pA_k(x') - pA_k(x'')] / RT = ln(y''/y')
 *   sum_k L_k(T) [pB_k(x') - pB_k(x'')] / RT = ln(x''/x'),
 * linear in the coefficients of L_k(T) = a_k + b_k T. Inside the solve, L_k = alpha_k + beta_k tau
 * with tau = (T - Tm)/Ts centred on the data's temperatures (a and b T are nearly collinear over a
 * narrow range otherwise); a_k = alpha_k - beta_k Tm/Ts and b_k = beta_k/Ts afterwards.
 *
 * Weighting: an equation residual e = (e_A, e_B) (in units of RT) moves the computed tie-line by
 *   dx' = (y'' e_A + x'' e_B) / (c' (x'' - x')),   dx'' = (y' e_A + x' e_B) / (c'' (x'' - x'))
 * to first order, c = g''/RT (from d mu_A/dx = -x g'', d mu_B/dx = y g''). The two rows of each
 * tie-line are replaced by these combinations, so the least squares minimise composition errors,
 * and dilute phases (where ln x is steep) count as much as concentrated ones. The first pass uses
 * the ideal curvature c = 1/(x y); two more passes use the curvature of the fitted model (held at
 * least at 5 % of the ideal one, so a point inside the fitted spinodal cannot take over the fit).
 */
import { R } from '../constants';
import { fail } from '../errors';
import type { RedlichKisterTerm } from '../models/redlichKister';
import { redlichKister } from '../models/redlichKister';
import { leastSquares, type LeastSquares } from './leastSquares';
import { partialA, partialB } from './rkBasis';

/** One measured tie-line: temperature (K) and the two coexisting mole fractions of B, x' < x''. */
export interface TieLine {
  T: number;
  xLow: number;
  xHigh: number;
}

/** Standard errors of one term's coefficients (undefined where not fitted). */
export interface TermErrors {
  a: number;
  b?: number;
}

export interface TieLineFit {
  /** The fitted terms L_k = a_k + b_k T (c_k = 0). */
  terms: RedlichKisterTerm[];
  /** Standard errors of a_k and b_k; undefined when the data exactly determine the coefficients. */
  errors?: TermErrors[];
  /** Equations minus coefficients. */
  dof: number;
  /** Root mean square of the weighted residuals: a linearised composition error (mole fraction). */
  rms: number;
  /** Condition number of the equilibrated design matrix. */
  condition: number;
}

/** Curvature floor, as a fraction of the ideal curvature 1/(x y), in the weighting passes. */
const CURVATURE_FLOOR = 0.05;
const PASSES = 3;

/**
 * Fits `slopes.length` Redlich–Kister terms; term k has a temperature slope b_k when slopes[k].
 * Throws 'input' when the tie-lines do not determine the coefficients.
 */
export function fitTieLines(data: readonly TieLine[], slopes: readonly boolean[]): TieLineFit {
  const nTerms = slopes.length;
  if (nTerms < 1) fail('input', 'give at least one Redlich–Kister term to fit');
  if (data.length === 0) fail('input', 'no tie-lines to fit');
  data.forEach((t, i) => {
    if (!(Number.isFinite(t.T) && t.T > 0)) fail('range', `tie-line ${i + 1}: T = ${t.T} must be a temperature above 0 K`);
    if (!(t.xLow > 0 && t.xLow < 1 && t.xHigh > 0 && t.xHigh < 1)) fail('range', `tie-line ${i + 1}: compositions must lie strictly between 0 and 1`);
    if (!(t.xLow < t.xHigh)) fail('input', `tie-line ${i + 1}: x' = ${t.xLow} must be below x'' = ${t.xHigh} (the A-rich phase first)`);
  });
  const nSlopes = slopes.filter(Boolean).length;
  const p = nTerms + nSlopes;
  const advice = 'use fewer terms or slopes, or add tie-lines (at other temperatures for slopes)';
  if (2 * data.length < p) {
    fail('input', `${data.length} tie-line${data.length > 1 ? 's give' : ' gives'} ${2 * data.length} equations for ${p} coefficients: the fit is under-determined; ${advice}`);
  }
  const Tmin = Math.min(...data.map((t) => t.T)), Tmax = Math.max(...data.map((t) => t.T));
  if (nSlopes > 0 && !(Tmax > Tmin)) {
    fail('input', 'temperature slopes need tie-lines at two or more temperatures: all are at the same T');
  }
  const Tm = data.reduce((s, t) => s + t.T, 0) / data.length;
  const Ts = nSlopes > 0 ? Math.max(Tmax - Tm, Tm - Tmin) : 1;

  // Unweighted rows (per RT) of each tie-line: coefficients of alpha_k / beta_k, and right-hand sides.
  const rows = data.map((t) => {
    const { T, xLow: x1, xHigh: x2 } = t;
    const y1 = 1 - x1, y2 = 1 - x2, RT = R * T, tau = (T - Tm) / Ts;
    const rowA: number[] = [], rowB: number[] = [];
    for (let k = 0; k < nTerms; k++) {
      const dA = (partialA(k, x1, y1) - partialA(k, x2, y2)) / RT;
      const dB = (partialB(k, x1, y1) - partialB(k, x2, y2)) / RT;
      rowA.push(dA); rowB.push(dB);
      if (slopes[k]) { rowA.push(dA * tau); rowB.push(dB * tau); }
    }
    return { t, rowA, rowB, rA: Math.log1p(-x2) - Math.log1p(-x1), rB: Math.log(x2 / x1) };
  });

  let solution: LeastSquares | undefined;
  let terms: RedlichKisterTerm[] = [];
  for (let pass = 0; pass < PASSES; pass++) {
    const model = pass > 0 ? redlichKister(terms) : undefined;
    const A: number[][] = [], r: number[] = [];
    for (const { t, rowA, rowB, rA, rB } of rows) {
      const x1 = t.xLow, x2 = t.xHigh, y1 = 1 - x1, y2 = 1 - x2, dx = x2 - x1;
      let c1 = 1 / (x1 * y1), c2 = 1 / (x2 * y2);
      if (model) {
        const iso = model.at(t.T);
        c1 = Math.max(iso.d2g(x1, y1) / iso.RT, CURVATURE_FLOOR * c1);
        c2 = Math.max(iso.d2g(x2, y2) / iso.RT, CURVATURE_FLOOR * c2);
      }
      const w1 = 1 / (c1 * dx), w2 = 1 / (c2 * dx);
      A.push(rowA.map((v, j) => w1 * (y2 * v + x2 * rowB[j])));
      r.push(w1 * (y2 * rA + x2 * rB));
      A.push(rowA.map((v, j) => w2 * (y1 * v + x1 * rowB[j])));
      r.push(w2 * (y1 * rA + x1 * rB));
    }
    solution = leastSquares(A, r, 'coefficients', advice);
    terms = toTerms(solution.theta, slopes, Tm, Ts);
  }
  const s = solution!;
  const rms = Math.sqrt(s.residuals.reduce((sum, e) => sum + e * e, 0) / s.residuals.length);
  return { terms, errors: s.covariance && toErrors(s.covariance, slopes, Tm, Ts), dof: s.dof, rms, condition: s.condition };
}

/** a_k = alpha_k - beta_k Tm/Ts, b_k = beta_k/Ts. */
function toTerms(theta: number[], slopes: readonly boolean[], Tm: number, Ts: number): RedlichKisterTerm[] {
  const terms: RedlichKisterTerm[] = [];
  let j = 0;
  for (const slope of slopes) {
    const alpha = theta[j++];
    const beta = slope ? theta[j++] : 0;
    terms.push({ a: alpha - (beta * Tm) / Ts, b: beta / Ts, c: 0 });
  }
  return terms;
}

/** Var(a) = Var(alpha) + m^2 Var(beta) - 2m Cov(alpha, beta) with m = Tm/Ts; Var(b) = Var(beta)/Ts^2. */
function toErrors(cov: number[][], slopes: readonly boolean[], Tm: number, Ts: number): TermErrors[] {
  const errors: TermErrors[] = [];
  let j = 0;
  for (const slope of slopes) {
    const i = j++;
    if (!slope) { errors.push({ a: Math.sqrt(cov[i][i]) }); continue; }
    const m = Tm / Ts, k = j++;
    const varA = cov[i][i] + m * m * cov[k][k] - 2 * m * cov[i][k];
    errors.push({ a: Math.sqrt(Math.max(0, varA)), b: Math.sqrt(cov[k][k]) / Ts });
  }
  return errors;
}
