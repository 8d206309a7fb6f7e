/**
 * One nonlinear weighted least-squares fit for every model of the registry and every kind of
 * measurement (./measurements.ts), in any mix:
 *   min over the free parameters of  sum_i [(model_i - measured_i) / sigma_i]^2,
 * residuals in the measured quantity's own units, each divided by its stated uncertainty.
 *
 * Starting values: those given; for Redlich–Kister (and regular) models whose free parameters are
 * constant parts and slopes (L_k, L_k.b) with the other parameters zero, the linear tie-line fit
 * (./tieLines.ts) when there are tie-lines; otherwise the defaults of ./parameters.ts refined by a
 * short grid, one parameter at a time (each over its value + unit x {-2, -1, -1/2, 1/2, 1, 2} and
 * 0, twice round, keeping the lowest sum of squares), so that a user need not guess.
 *
 * Covariance of the free parameters at the optimum (linearised, e.g. Bard, Nonlinear Parameter
 * Estimation (1974), ch. 7):
 *   C = s^2 (J^T J)^-1,  J = d r_weighted / d theta,
 * with s^2 = S / (n - p) when the uncertainties are relative weights (default), or s^2 = 1 when
 * they are stated as absolute standard deviations (`absolute: true`).
 */
import { fail, MixgapError } from '../errors';
import type { ModelFamily } from '../family';
import type { BinaryModel } from '../model';
import { inverseNormal, levenbergMarquardt, type LeastSquaresProblem } from './levenbergMarquardt';
import { ResidualEvaluator, type Measurement, type ResidualRow } from './measurements';
import { buildModel, checkParameters, parameterUnit, startingValues, type ParameterSpec } from './parameters';
import { fitTieLines } from './tieLines';

export interface FitOptions {
  /** The stated uncertainties are absolute standard deviations (default: relative weights). */
  absolute?: boolean;
}

export interface NonlinearFit {
  family: ModelFamily;
  /** Every parameter's value (fixed and fitted), SI units. */
  values: Record<string, number>;
  /** Names of the free parameters, in the order of `covariance`. */
  free: string[];
  /** Scale of each free parameter (finite-difference steps, see ./parameters.ts). */
  units: number[];
  model: BinaryModel;
  /** One row per measured quantity: which measurement, what, its sigma and residual (own units). */
  rows: Array<ResidualRow & { residual: number }>;
  /** Weighted sum of squares S. */
  S: number;
  /** n - p. */
  dof: number;
  /** s^2 used for the covariance (1 when absolute). */
  variance: number;
  /** Covariance of the free parameters, undefined when dof = 0 and the weights are relative. */
  covariance?: number[][];
  /** Condition number of the column-scaled Jacobian. */
  condition: number;
  iterations: number;
}

/** Fits the free parameters of `family` to the measurements. */
export function fitModel(family: ModelFamily, parameters: readonly ParameterSpec[], data: readonly Measurement[], options: FitOptions = {}): NonlinearFit {
  checkParameters(family, parameters);
  const evaluator = new ResidualEvaluator(data);
  const Tref = referenceTemperature(data);
  const free = parameters.filter((p) => p.free).map((p) => p.name);
  const units = free.map((name) => parameterUnit(name, Tref));
  const base = startingValues(parameters, Tref);
  const valuesAt = (theta: readonly number[]) => {
    const v = { ...base };
    free.forEach((name, j) => { v[name] = theta[j]; });
    return v;
  };
  const problem: LeastSquaresProblem = {
    names: free,
    units,
    residuals: (theta) => evaluator.weighted(buildModel(family, valuesAt(theta))),
  };

  const theta0 = start(family, parameters, data, free, units, base, problem, evaluator);
  const solution = levenbergMarquardt(problem, theta0);
  const values = valuesAt(solution.theta);
  const model = buildModel(family, values);
  evaluator.verify(model);
  const residuals = evaluator.residuals(model);
  const n = residuals.length, p = free.length, dof = n - p;
  const absolute = options.absolute === true;
  const variance = absolute ? 1 : dof > 0 ? solution.S / dof : NaN;
  const covariance = Number.isFinite(variance) ? inverseNormal(solution.J).map((row) => row.map((c) => c * variance)) : undefined;
  return {
    family,
    values,
    free,
    units,
    model,
    rows: evaluator.rows.map((row, k) => ({ ...row, residual: residuals[k] })),
    S: solution.S,
    dof,
    variance,
    covariance,
    condition: solution.condition,
    iterations: solution.iterations,
  };
}

/** Mean of the measured temperatures. */
function referenceTemperature(data: readonly Measurement[]): number {
  const Ts = data.map((m) => (m.kind === 'critical point' ? m.Tc : m.T));
  return Ts.reduce((s, T) => s + T, 0) / Ts.length;
}

/** Starting values of the free parameters (see the header). */
function start(
  family: ModelFamily, parameters: readonly ParameterSpec[], data: readonly Measurement[], free: string[], units: number[],
  base: Record<string, number>, problem: LeastSquaresProblem, evaluator: ResidualEvaluator,
): number[] {
  const given = free.map((name) => parameters.find((p) => p.name === name)!.value);
  let theta = free.map((name) => base[name]);
  if (given.every((v) => v !== undefined)) return theta;
  const S = (t: readonly number[]) => {
    try {
      const r = problem.residuals(t);
      const s = r.reduce((a, v) => a + v * v, 0);
      return Number.isFinite(s) ? s : Infinity;
    } catch (e) {
      if (e instanceof MixgapError) return Infinity;
      throw e;
    }
  };
  const linear = linearStart(family, parameters, data, free);
  if (linear) {
    const t = free.map((name, j) => given[j] ?? linear[name] ?? theta[j]);
    evaluator.reset();
    if (Number.isFinite(S(t))) return t;
  }
  // A candidate counts only when its tracked cloud and critical points are the model's global ones:
  // a fresh local critical-point solve can settle on a spurious sign change of the curvature
  // minimum (a Flory–Huggins system with one measured Tc did), and LM cannot start from there.
  const checked = (t: readonly number[], s: number) => {
    if (!Number.isFinite(s) || !data.some((m) => m.kind === 'cloud point' || m.kind === 'critical point')) return s;
    try {
      evaluator.verify(buildModel(family, Object.fromEntries(Object.entries(base).map(([k, v]) => [k, free.includes(k) ? t[free.indexOf(k)] : v]))));
      return s;
    } catch (e) {
      if (e instanceof MixgapError) return Infinity;
      throw e;
    }
  };
  // one parameter at a time over a short grid, twice round
  evaluator.reset();
  let best = checked(theta, S(theta));
  for (let round = 0; round < 2; round++) {
    for (let j = 0; j < free.length; j++) {
      if (given[j] !== undefined) continue;
      const centre = theta[j];
      for (const m of [-2, -1, -0.5, 0.5, 1, 2, 0]) {
        const t = theta.map((v, k) => (k === j ? (m === 0 ? 0 : centre + m * units[j]) : v));
        evaluator.reset();
        const s = S(t);
        if (s < best && checked(t, s) < best) { best = s; theta = t; }
      }
    }
  }
  evaluator.reset();
  if (!Number.isFinite(best)) {
    fail('none', `no starting values were found for which the model has the measured gaps, cloud points and critical points (tried around ${free.map((n, j) => `${n} = ${theta[j].toPrecision(4)}`).join(', ')}): give starting values for the free parameters`);
  }
  return theta;
}

/**
 * The linear tie-line fit, for Redlich–Kister (regular) models whose free parameters are L_k and
 * L_k.b only and whose other parameters are zero; undefined where it does not apply or fails.
 */
function linearStart(family: ModelFamily, parameters: readonly ParameterSpec[], data: readonly Measurement[], free: string[]): Record<string, number> | undefined {
  if (family.name !== 'regular' && family.name !== 'redlich-kister') return undefined;
  if (parameters.some((p) => !p.free && p.value !== 0)) return undefined;
  const name = (n: string) => (n === 'omega' ? 'L0' : n);
  const terms: number[] = [];
  for (const n of free.map(name)) {
    const m = /^L(\d+)(\.b)?$/.exec(n);
    if (!m) return undefined;
    terms.push(Number(m[1]));
  }
  const nTerms = Math.max(...terms) + 1;
  const slopes = Array.from({ length: nTerms }, (_, k) => free.map(name).includes(`L${k}.b`));
  if (!Array.from({ length: nTerms }, (_, k) => free.map(name).includes(`L${k}`)).every(Boolean)) return undefined;
  const tieLines = data.flatMap((m) => (m.kind === 'tie-line' ? [{ T: m.T, xLow: m.xLow, xHigh: m.xHigh }] : []));
  if (tieLines.length === 0) return undefined;
  try {
    const fit = fitTieLines(tieLines, slopes);
    const out: Record<string, number> = {};
    fit.terms.forEach((t, k) => {
      out[k === 0 && family.name === 'regular' ? 'omega' : `L${k}`] = t.a;
      if (slopes[k]) out[`L${k}.b`] = t.b;
    });
    return out;
  } catch (e) {
    if (e instanceof MixgapError) return undefined;
    throw e;
  }
}

/** The model of a fit at other values of its free parameters (for propagation). */
export function modelAt(fit: Pick<NonlinearFit, 'family' | 'values' | 'free'>, theta: readonly number[]): BinaryModel {
  const v = { ...fit.values };
  fit.free.forEach((name, j) => { v[name] = theta[j]; });
  return buildModel(fit.family, v);
}
