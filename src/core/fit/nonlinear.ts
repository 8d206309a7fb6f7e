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
 * The iterations work in centred coordinates (see `centring`): a constant part and its
 * temperature term are replaced by the value at the data's mean temperature and the same term.
 *
 * Several systems can be fitted at once (`fitSystems`): the free parameters are shared, each
 * system has its own fixed values (the chain length of each polymer fraction, say) and data.
 *
 * Covariance of the free parameters at the optimum (linearised, e.g. Bard, Nonlinear Parameter
 * Estimation (1974), ch. 7):
 *   C = s^2 (J^T J)^-1,  J = d r_weighted / d theta,
 * with s^2 = S / (n - p) when the uncertainties are relative weights (default), or s^2 = 1 when
 * they are stated as absolute standard deviations (`absolute: true`).
 */
import { fail, MixgapError } from '../errors';
import { owns, type ModelFamily } from '../family';
import type { BinaryModel } from '../model';
import { identifiable, inverseNormal, levenbergMarquardt, type LeastSquaresProblem } from './levenbergMarquardt';
import { ResidualEvaluator, type Measurement, type ResidualRow } from './measurements';
import { buildModel, checkParameters, parameterUnit, startingValues, type ParameterSpec } from './parameters';
import { fitTieLines } from './tieLines';

export interface FitOptions {
  /** The stated uncertainties are absolute standard deviations (default: relative weights). */
  absolute?: boolean;
}

/**
 * One system of a joint fit: its own values of some fixed parameters (e.g. the chain length NB of
 * one polymer fraction) and its measurements. The free parameters are shared by all systems.
 */
export interface FitSystem {
  fixed?: Readonly<Record<string, number>>;
  data: readonly Measurement[];
}

export interface NonlinearFit {
  family: ModelFamily;
  /** Every parameter's value (fixed and fitted), SI units (a joint fit: those of the first system). */
  values: Record<string, number>;
  /** Names of the free parameters, in the order of `covariance`. */
  free: string[];
  /** Scale of each free parameter (finite-difference steps, see ./parameters.ts). */
  units: number[];
  /** The fitted model (a joint fit: of the first system; `models` holds one per system). */
  model: BinaryModel;
  models: BinaryModel[];
  /** One row per measured quantity: which system and measurement, what, its sigma and residual (own units). */
  rows: Array<ResidualRow & { system: number; residual: number }>;
  /** Weighted sum of squares S. */
  S: number;
  /** n - p. */
  dof: number;
  /** s^2 used for the covariance (1 when absolute). */
  variance: number;
  /** Covariance of the free parameters, undefined when dof = 0 and the weights are relative. */
  covariance?: number[][];
  /** Condition number of the column-scaled Jacobian (with respect to the parameters as named). */
  condition: number;
  iterations: number;
}

/** Fits the free parameters of `family` to the measurements. */
export function fitModel(family: ModelFamily, parameters: readonly ParameterSpec[], data: readonly Measurement[], options: FitOptions = {}): NonlinearFit {
  return fitSystems(family, parameters, [{ data }], options);
}

/**
 * Fits the free parameters, shared by every system, to the measurements of all systems at once;
 * each system's model takes its own `fixed` values over those of `parameters`.
 */
export function fitSystems(family: ModelFamily, parameters: readonly ParameterSpec[], systems: readonly FitSystem[], options: FitOptions = {}): NonlinearFit {
  checkParameters(family, parameters);
  if (systems.length === 0) fail('input', 'no measurements to fit');
  const free = parameters.filter((p) => p.free).map((p) => p.name);
  systems.forEach((s, k) => {
    for (const [name, value] of Object.entries(s.fixed ?? {})) {
      if (!owns(family, name)) fail('input', `system ${k + 1}: "${name}" is not a parameter of the ${family.name} model`);
      if (free.includes(name)) fail('input', `system ${k + 1}: ${name} is free (shared by all systems) and cannot also be fixed for one system`);
      if (!Number.isFinite(value)) fail('input', `system ${k + 1}: parameter ${name} must be a finite number (got ${value})`);
    }
  });
  const evaluators = systems.map((s) => new ResidualEvaluator(s.data));
  const allData = systems.flatMap((s) => s.data);
  const Tref = referenceTemperature(allData);
  const units = free.map((name) => parameterUnit(name, Tref));
  const first = systems[0].fixed ?? {};
  const base = startingValues([
    ...parameters.filter((p) => p.free || !(p.name in first)),
    ...Object.entries(first).map(([name, value]) => ({ name, value, free: false })),
  ], Tref);
  const valuesAt = (theta: readonly number[], k: number) => {
    const v = { ...base, ...(systems[k].fixed ?? {}) };
    free.forEach((name, j) => { v[name] = theta[j]; });
    return v;
  };
  const reset = () => evaluators.forEach((e) => e.reset());
  const weighted = (theta: readonly number[]) => evaluators.flatMap((e, k) => e.weighted(buildModel(family, valuesAt(theta, k))));
  const problem: LeastSquaresProblem = { names: free, units, residuals: weighted };
  const c = centring(free, Tref);
  const centred: LeastSquaresProblem = { names: free, units, residuals: (phi) => weighted(c.fromCentred(phi)) };

  // the grid start's check that tracked cloud and critical points are the models' global ones
  const verify = allData.some((m) => m.kind === 'cloud point' || m.kind === 'critical point')
    ? (t: readonly number[]) => evaluators.forEach((e, k) => e.verify(buildModel(family, valuesAt(t, k))))
    : undefined;
  const theta0 = start(family, parameters, systems.length === 1 ? allData : undefined, free, units, base, problem, reset, verify);
  const solution = levenbergMarquardt(centred, c.toCentred(theta0), { check: false });
  const theta = c.fromCentred(solution.theta);
  // the Jacobian with respect to the parameters as named: J_theta = J_phi dphi/dtheta
  const J = c.jacobian(solution.J);
  const condition = identifiable(free, J);
  const models = systems.map((_, k) => buildModel(family, valuesAt(theta, k)));
  evaluators.forEach((e, k) => e.verify(models[k]));
  const rows = evaluators.flatMap((e, k) => {
    // tie-lines and boundary points from fresh phase maps (the iterations followed them from model
    // to model); cloud and critical points as verified just above
    const r = e.residuals(models[k], true);
    return e.rows.map((row, i) => ({ ...row, system: k, residual: r[i] }));
  });
  // The answer must be the minimum of what is reported: a sum of squares from the verified, freshly
  // solved residuals above that of the iterations (beyond the solvers' noise, ~1e-12 relative, and
  // 1e-12 per row absolute for exact fits) means the iterations followed a spurious feature.
  const Sfresh = rows.reduce((a, row) => a + (row.residual / row.sigma) ** 2, 0);
  if (!(Sfresh <= solution.S * (1 + 1e-6) + 1e-12 * rows.length)) {
    fail('convergence', `the fit followed a feature of the model that the global check does not confirm (sum of squares ${solution.S.toPrecision(4)} while tracked, ${Sfresh.toPrecision(4)} from the global solution); give starting values closer to the data`);
  }
  const n = rows.length, p = free.length, dof = n - p;
  const absolute = options.absolute === true;
  const variance = absolute ? 1 : dof > 0 ? solution.S / dof : NaN;
  const covariance = Number.isFinite(variance) ? inverseNormal(J).map((row) => row.map((v) => v * variance)) : undefined;
  return {
    family,
    values: valuesAt(theta, 0),
    free,
    units,
    model: models[0],
    models,
    rows,
    S: solution.S,
    dof,
    variance,
    covariance,
    condition,
    iterations: solution.iterations,
  };
}

/**
 * The coordinates the iterations work in. A constant part and its temperature term, both free
 * (tau_ij = a_ij + b_ij/T, chi = chi.A + chi.B/T, L_k = a + b T), are nearly the same direction for
 * data over a narrow range of T: over 265–272 K a change of b_ij/T is a change of a_ij to within
 * 3 %, and the valley of S along that direction is long and narrow (condition numbers of 1e3 to
 * 1e4), so that Levenberg–Marquardt creeps along it and stops early, or not at all. The constant
 * part is replaced by the value at Tref (a + b/Tref, a + b Tref), which the data pin down whatever
 * the slope (the usual centring of a regressor, e.g. Draper & Smith, Applied Regression Analysis,
 * 3rd ed. (1998), ch. 16). A linear change of coordinates: the minimum is the same, only the path
 * to it changes; the Jacobian, the condition number and the covariance are reported with respect
 * to the parameters as named.
 */
function centring(free: readonly string[], Tref: number) {
  const pairs: Array<{ constant: number; slope: number; factor: number }> = [];
  const add = (a: string, b: string, factor: number) => {
    const i = free.indexOf(a), j = free.indexOf(b);
    if (i >= 0 && j >= 0) pairs.push({ constant: i, slope: j, factor });
  };
  add('a12', 'b12', 1 / Tref);
  add('a21', 'b21', 1 / Tref);
  add('chi.A', 'chi.B', 1 / Tref);
  for (const name of free) {
    const m = /^L(\d+)$/.exec(name);
    if (m) add(name, `L${m[1]}.b`, Tref);
  }
  return {
    toCentred(theta: readonly number[]): number[] {
      const phi = [...theta];
      for (const { constant, slope, factor } of pairs) phi[constant] = theta[constant] + factor * theta[slope];
      return phi;
    },
    fromCentred(phi: readonly number[]): number[] {
      const theta = [...phi];
      for (const { constant, slope, factor } of pairs) theta[constant] = phi[constant] - factor * phi[slope];
      return theta;
    },
    /** d r / d theta from d r / d phi: column slope gains factor x column constant. */
    jacobian(Jphi: readonly number[][]): number[][] {
      return Jphi.map((row) => {
        const out = [...row];
        for (const { constant, slope, factor } of pairs) out[slope] = row[slope] + factor * row[constant];
        return out;
      });
    },
  };
}

/** Mean of the measured temperatures. */
function referenceTemperature(data: readonly Measurement[]): number {
  const Ts = data.map((m) => (m.kind === 'critical point' ? m.Tc : m.T));
  return Ts.reduce((s, T) => s + T, 0) / Ts.length;
}

/** Starting values of the free parameters (see the header). */
function start(
  family: ModelFamily, parameters: readonly ParameterSpec[], data: readonly Measurement[] | undefined, free: string[], units: number[],
  base: Record<string, number>, problem: LeastSquaresProblem, reset: () => void,
  verify: ((t: readonly number[]) => void) | undefined,
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
  const linear = data && linearStart(family, parameters, data, free);
  if (linear) {
    const t = free.map((name, j) => given[j] ?? linear[name] ?? theta[j]);
    reset();
    if (Number.isFinite(S(t))) return t;
  }
  // A candidate counts only when its tracked cloud and critical points are the model's global ones:
  // a fresh local critical-point solve can settle on a spurious sign change of the curvature
  // minimum (a Flory–Huggins system with one measured Tc did), and LM cannot start from there.
  const checked = (t: readonly number[], s: number) => {
    if (!Number.isFinite(s) || !verify) return s;
    try {
      verify(t);
      // verify may have moved a track from a spurious point to the global one: the sum of squares
      // the candidate really has is the one from there
      return S(t);
    } catch (e) {
      if (e instanceof MixgapError) return Infinity;
      throw e;
    }
  };
  // one parameter at a time over a short grid, twice round
  reset();
  let best = checked(theta, S(theta));
  for (let round = 0; round < 2; round++) {
    for (let j = 0; j < free.length; j++) {
      if (given[j] !== undefined) continue;
      const centre = theta[j];
      for (const m of [-2, -1, -0.5, 0.5, 1, 2, 0]) {
        const t = theta.map((v, k) => (k === j ? (m === 0 ? 0 : centre + m * units[j]) : v));
        reset();
        const s = S(t);
        if (s < best && checked(t, s) < best) { best = s; theta = t; }
      }
    }
  }
  reset();
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
