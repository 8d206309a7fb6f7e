/**
 * Levenberg–Marquardt for min S(theta) = sum_i r_i(theta)^2 over a few parameters, written once for
 * every fit (Marquardt, J. SIAM 11 (1963) 431; scaling by diag(J^T J) as in Moré, Lecture Notes
 * in Mathematics 630 (1978) 105). Each step solves
 *   (J^T J + lambda diag(J^T J)) delta = -J^T r,
 * accepts it when S decreases (lambda / 3) and otherwise retries with lambda * 4. A residual that
 * cannot be evaluated (the model lost its gap at a measured temperature) counts as S = infinity:
 * the step is refused and shortened.
 *
 * The Jacobian is by finite differences with a step per parameter, h_j = c max(|theta_j|, unit_j),
 * unit_j being the parameter's change that moves g/RT by about 1 (./parameters.ts). The residuals
 * come out of root solvers good to a relative 1e-13 or better (noise eps ~ 1e-12 in the worst
 * case). At the solution (covariance, identifiability) central differences with c = eps^(1/3) ~
 * 1e-4 balance truncation (~h^2 ~ 1e-8) against noise (eps/h ~ 1e-8): J good to about 1e-8.
 * During the iterations forward differences with c = eps^(1/2) ~ 1e-6 (truncation ~h and noise
 * eps/h both ~1e-6) cost half as many evaluations and still give steps good to 1e-6, far below
 * what the iteration needs (Press et al., Numerical Recipes, 3rd ed. (2007), sec. 5.7).
 *
 * At the solution the columns of J are scaled to unit length and the condition number of the
 * scaled J (sqrt of the eigenvalue ratio of its normal matrix, ./symmetricEigen.ts) decides whether the data
 * determine the parameters; the eigenvector of the smallest eigenvalue names those that they cannot
 * tell apart.
 */
import { fail, MixgapError } from '../errors';
import { MAX_CONDITION } from './leastSquares';
import { invert, solve } from './smallMatrix';
import { symmetricEigen } from './symmetricEigen';

export interface LeastSquaresProblem {
  /** Parameter names, for messages. */
  names: readonly string[];
  /** Scale of each parameter (./parameters.ts parameterUnit). */
  units: readonly number[];
  /** Weighted residuals at theta; throws MixgapError where they do not exist. */
  residuals(theta: readonly number[]): number[];
}

export interface LeastSquaresSolution {
  theta: number[];
  /** Weighted residuals at theta. */
  r: number[];
  /** Jacobian of the weighted residuals at theta (n x p). */
  J: number[][];
  /** S = sum r^2. */
  S: number;
  iterations: number;
  /** Condition number of the column-scaled Jacobian. */
  condition: number;
}

/** Relative finite-difference steps (see above): central at the solution, forward in the iterations. */
export const FD_STEP = 1e-4;
export const FORWARD_STEP = 1e-6;
const MAX_ITERATIONS = 200;

/** The central-difference step of parameter j at theta. */
export function fdStep(theta: readonly number[], units: readonly number[], j: number, relative = FD_STEP): number {
  return relative * Math.max(Math.abs(theta[j]), units[j]);
}

/** S, or Infinity where the residuals cannot be evaluated (with the reason, when one was given). */
function costOf(problem: LeastSquaresProblem, theta: readonly number[]): { S: number; r?: number[]; why?: string } {
  try {
    const r = problem.residuals(theta);
    const S = r.reduce((s, v) => s + v * v, 0);
    return Number.isFinite(S) ? { S, r } : { S: Infinity };
  } catch (e) {
    if (e instanceof MixgapError) return { S: Infinity, why: e.message };
    throw e;
  }
}

/**
 * d r / d theta_j by central (or forward) differences, one-sided where one neighbour cannot be
 * evaluated.
 * Fails ('convergence') naming the parameter when neither neighbour can.
 */
export function jacobian(
  problem: LeastSquaresProblem, theta: readonly number[], r0: readonly number[], central = true,
  edges?: Array<{ name: string; step: number; why?: string }>,
): number[][] {
  const n = r0.length, p = theta.length;
  const J = Array.from({ length: n }, () => new Array<number>(p).fill(0));
  for (let j = 0; j < p; j++) {
    const h = fdStep(theta, problem.units, j, central ? FD_STEP : FORWARD_STEP);
    const at = (t: number) => costOf(problem, theta.map((v, k) => (k === j ? v + t : v)));
    const up = at(h), plus = up.r;
    const down = central || !plus ? at(-h) : undefined, minus = down?.r;
    if (central && plus && !minus) edges?.push({ name: problem.names[j], step: -h, why: down?.why });
    if (central && minus && !plus) edges?.push({ name: problem.names[j], step: h, why: up.why });
    let col: (i: number) => number;
    if (plus && minus) col = (i) => (plus[i] - minus[i]) / (2 * h);
    else if (plus) col = (i) => (plus[i] - r0[i]) / h;
    else if (minus) col = (i) => (r0[i] - minus[i]) / h;
    else {
      return fail('convergence', `the residuals cannot be computed when ${problem.names[j]} moves by ${h.toPrecision(3)} either way from ${theta[j].toPrecision(8)}: the model loses a measured gap or critical point there; give other starting values or fewer free parameters`);
    }
    for (let i = 0; i < n; i++) J[i][j] = col(i);
  }
  return J;
}

/**
 * Minimises S from theta0; fails with a named reason when it cannot. With `check: false` the
 * identifiability check at the solution is left to the caller (who may judge it in other
 * coordinates, see ./nonlinear.ts): `condition` is then NaN.
 */
export function levenbergMarquardt(problem: LeastSquaresProblem, theta0: readonly number[], options: { check?: boolean } = {}): LeastSquaresSolution {
  const check = options.check !== false;
  const p = theta0.length;
  let theta = [...theta0];
  const start = costOf(problem, theta);
  if (!start.r) fail('none', 'the starting parameters give no model with the measured gaps, cloud points or critical points: give starting values for the free parameters');
  let r = start.r, S = start.S;
  const n = r.length;
  if (n < p) fail('input', `${n} measured quantities cannot determine ${p} free parameters (${problem.names.join(', ')}): fix some parameters or add measurements`);
  let lambda = 1e-3;
  let J = jacobian(problem, theta, r, false);
  for (let iter = 1; iter <= MAX_ITERATIONS; iter++) {
    const { A, g } = normal(J, r);
    const D = A.map((row, j) => Math.max(row[j], 1e-300));
    let accepted = false;
    let delta: number[] = [];
    // Solved with unit diagonal scaling, d_j = sqrt(D_j): (A/dd + lambda I) z = -g/d, delta = z/d.
    const d = D.map(Math.sqrt);
    const As = A.map((row, j) => row.map((v, k) => v / (d[j] * d[k])));
    const gs = g.map((v, j) => -v / d[j]);
    while (lambda <= 1e16) {
      const M = As.map((row, j) => row.map((v, k) => (j === k ? v + lambda : v)));
      const z = solve(M, gs);
      if (!z) {
        lambda *= 4;
        continue;
      }
      delta = z.map((v, j) => v / d[j]);
      const trial = theta.map((v, j) => v + delta[j]);
      const next = costOf(problem, trial);
      if (next.r && next.S < S) {
        const small = delta.every((d, j) => Math.abs(d) <= 1e-10 * Math.max(Math.abs(trial[j]), problem.units[j]));
        const flat = S - next.S <= 1e-14 * S;
        theta = trial; r = next.r; S = next.S;
        lambda = Math.max(lambda / 3, 1e-12);
        accepted = true;
        if (small || flat || S === 0) return finish(problem, theta, r, S, iter, check);
        break;
      }
      // no decrease: converged if even the Gauss–Newton prediction is below rounding of S
      const predicted = -g.reduce((s, v, j) => s + v * delta[j], 0);
      if (predicted <= 1e-14 * S + 1e-300) return finish(problem, theta, r, S, iter, check);
      lambda *= 4;
    }
    if (!accepted) {
      const worst = worstGradient(problem.names, g, D);
      fail('convergence', `the fit stalled after ${iter} iterations: no step lowers the sum of squares (${S.toPrecision(6)}) though its slope along ${worst} is not zero; give other starting values or fewer free parameters`);
    }
    J = jacobian(problem, theta, r, false);
  }
  const { g, A } = normal(J, r);
  fail('convergence', `the fit did not converge in ${MAX_ITERATIONS} iterations (still moving along ${worstGradient(problem.names, g, A.map((row, j) => row[j]))}): give starting values closer to the data or fix that parameter`);
}

/** J^T J and J^T r. */
function normal(J: number[][], r: readonly number[]): { A: number[][]; g: number[] } {
  const p = J[0].length;
  const A = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  const g = new Array<number>(p).fill(0);
  J.forEach((row, i) => {
    for (let j = 0; j < p; j++) {
      g[j] += row[j] * r[i];
      for (let k = 0; k <= j; k++) A[j][k] += row[j] * row[k];
    }
  });
  for (let j = 0; j < p; j++) for (let k = 0; k < j; k++) A[k][j] = A[j][k];
  return { A, g };
}

function worstGradient(names: readonly string[], g: readonly number[], D: readonly number[]): string {
  let best = 0;
  g.forEach((v, j) => { if (Math.abs(v) / Math.sqrt(D[j] || 1) > Math.abs(g[best]) / Math.sqrt(D[best] || 1)) best = j; });
  return names[best];
}

/**
 * The Jacobian at the solution, one Gauss–Newton step with it, and the identifiability check.
 * The iterations stop where S no longer changes beyond its rounding (1e-14 S), which leaves each
 * parameter up to about 1e-7 of its standard error from the minimum (S - S_min ~ (dtheta/sigma)^2);
 * the step (J^T J) delta = -J^T r with the central-difference Jacobian (good to ~1e-8) needs no
 * comparison of S and takes the rest. It is kept unless S rises by more than 1e-11 of itself: the
 * residuals carry the root solvers' noise (up to ~1e-12 relative, see above), so S is only
 * known to a few 1e-12 and a step that refines the parameters can raise it by that much.
 */
function finish(problem: LeastSquaresProblem, theta: number[], r: number[], S: number, iterations: number, check: boolean): LeastSquaresSolution {
  const edges: Array<{ name: string; step: number; why?: string }> = [];
  const J = jacobian(problem, theta, r, true, edges);
  // A minimum within one difference step of where the residuals stop existing is the edge of the
  // model's reach, not a minimum of S: the data pull it to where a measured gap or critical point
  // vanishes, and the slopes (and any covariance) there mean nothing.
  if (edges.length > 0) {
    const e = edges[0];
    fail('convergence', `the fit ran into the edge of what the model can describe: moving ${e.name} by ${e.step.toPrecision(3)} from ${theta[problem.names.indexOf(e.name)].toPrecision(8)} loses a measured feature${e.why ? ` (${e.why})` : ''}; the data ask for more than the model gives there: check the measurements, free another parameter or choose another model`);
  }
  const step = gaussNewtonStep(J, r);
  if (step) {
    const trial = theta.map((v, j) => v + step[j]);
    const next = costOf(problem, trial);
    if (next.r && next.S <= S * (1 + 1e-11)) { theta = trial; r = next.r; S = next.S; }
  }
  const condition = check ? identifiable(problem.names, J) : NaN;
  return { theta, r, J, S, iterations, condition };
}

/** delta solving (J^T J) delta = -J^T r with unit diagonal scaling; undefined when singular. */
function gaussNewtonStep(J: number[][], r: readonly number[]): number[] | undefined {
  const { A, g } = normal(J, r);
  const d = A.map((row, j) => Math.sqrt(row[j]));
  if (!d.every((v) => v > 0 && Number.isFinite(v))) return undefined;
  const z = solve(A.map((row, j) => row.map((v, k) => v / (d[j] * d[k]))), g.map((v, j) => -v / d[j]));
  const delta = z?.map((v, j) => v / d[j]);
  return delta && delta.every(Number.isFinite) ? delta : undefined;
}

/**
 * Condition number of J with unit columns; fails ('input') naming the parameter(s) the data do not
 * determine: a column of zeros (no measurement depends on it), or the largest components of the
 * eigenvector of the smallest eigenvalue when the condition number exceeds MAX_CONDITION.
 */
export function identifiable(names: readonly string[], J: number[][]): number {
  const p = names.length;
  const s = new Array<number>(p).fill(0);
  for (const row of J) for (let j = 0; j < p; j++) s[j] += row[j] * row[j];
  for (let j = 0; j < p; j++) {
    s[j] = Math.sqrt(s[j]);
    if (!(s[j] > 0)) fail('input', `parameter ${names[j]} is not determined: no measurement depends on it; fix it at a value or add measurements that do`);
  }
  const scaled = J.map((row) => row.map((v, j) => v / s[j]));
  const { A } = normal(scaled, new Array<number>(J.length).fill(0));
  if (p === 1) return 1;
  const { values: lambdas, vectors } = symmetricEigen(A);
  const lmin = Math.min(...lambdas), lmax = Math.max(...lambdas);
  const condition = lmin > 0 ? Math.sqrt(lmax / lmin) : Infinity;
  if (!(condition <= MAX_CONDITION)) {
    const v = vectors[lambdas.indexOf(lmin)];
    const order = v.map((c, j) => ({ c: Math.abs(c), j })).sort((a, b) => b.c - a.c);
    const involved = order.filter((o) => o.c >= 0.2).map((o) => names[o.j]);
    const what = involved.length >= 2 ? `the data cannot tell ${involved.slice(0, -1).join(', ')} and ${involved[involved.length - 1]} apart` : `parameter ${names[order[0].j]} is not determined by the data`;
    fail('input', `${what} (condition number ${condition === Infinity ? 'infinite' : condition.toExponential(1)}): fix one of them at a value, or add measurements at other temperatures or compositions`);
  }
  return condition;
}

/** (J^T J)^-1, computed with unit columns for accuracy. */
export function inverseNormal(J: number[][]): number[][] {
  const p = J[0].length;
  const s = new Array<number>(p).fill(0);
  for (const row of J) for (let j = 0; j < p; j++) s[j] += row[j] * row[j];
  for (let j = 0; j < p; j++) s[j] = Math.sqrt(s[j]);
  const { A } = normal(J.map((row) => row.map((v, j) => v / s[j])), new Array<number>(J.length).fill(0));
  const inv = invert(A);
  if (!inv) fail('input', 'the parameters\' covariance cannot be computed: the normal matrix is singular; fix a parameter or add measurements');
  return inv.map((row, j) => row.map((v, k) => v / (s[j] * s[k])));
}
