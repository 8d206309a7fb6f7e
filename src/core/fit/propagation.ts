/**
 * Standard uncertainty of any result computed from fitted parameters, by linear propagation
 * (GUM, JCGM 100:2008, eq. 13):
 *   u(r)^2 = g^T C g,   g_j = d r / d theta_j,
 * with C the covariance of the free parameters (./nonlinear.ts) and g by forward differences with
 * step 1e-6 of each parameter's scale (./levenbergMarquardt.ts: truncation and the results' own
 * rounding, ~1e-12, both give about 1e-6 relative, far below what an uncertainty needs), one
 * evaluation per parameter.
 *
 * Linear propagation is only honest where r exists and is nearly linear over the parameters'
 * spread. With the value itself and the two ends below, u(r) costs p + 3 evaluations of r.
 * Along the direction in which r changes fastest within the k-sigma ellipsoid of the
 * parameters, delta = k C g / u(r) (where the linearised r reaches r0 +- k u(r)), r is evaluated at
 * theta +- delta:
 * - if it does not exist there (no gap, no critical point), the result fails ('none');
 * - if either end differs from the linear prediction r0 +- k u(r) by more than 10 % of k u(r)
 *   (a boundary near a critical point, where x depends on sqrt(Tc - T)), it fails ('range'):
 *   a band misplaced by more than a tenth of its width is no answer (common practice, no
 *   published source).
 *
 * `propagateOver` is the same for any named parameter values with a covariance (a card's u() and
 * r() rows) and any result of the values: central differences with steps of a hundredth of each
 * parameter's own standard uncertainty (truncation ~(h/u)^2 = 1e-4 of the curvature that the band
 * test allows, at most 10 %, so ~1e-5 relative), 2p + 3 evaluations in all.
 */
import { fail, MixgapError } from '../errors';
import type { BinaryModel } from '../model';
import { fdStep, FORWARD_STEP } from './levenbergMarquardt';
import { modelAt, type NonlinearFit } from './nonlinear';
import { parameterUnit } from './parameters';

export interface Uncertainty {
  /** r at the fitted parameters. */
  value: number;
  /** Standard uncertainty u(r). */
  sigma: number;
  /** d r / d theta_j, in the order of fit.free. */
  gradient: number[];
}

/** Largest allowed departure of r(theta +- delta) from r0 +- k u, as a fraction of k u. */
export const MAX_NONLINEARITY = 0.1;

/**
 * What propagation needs of a fit: the family, every parameter's value, the free ones with their
 * covariance, and their scales (./parameters.ts parameterUnit; when absent, taken at 1000 K: they
 * only bound the finite-difference steps from below, 1e-4 max(|theta|, unit)).
 */
export type Fit = Pick<NonlinearFit, 'family' | 'values' | 'free' | 'covariance'> & { units?: readonly number[] };

/**
 * u(r) for r(model) at the fitted parameters; `k` (default 2) is the band, in standard deviations,
 * over which r must exist and be nearly linear; `what` names r in messages.
 */
/**
 * The results' own rounding, relative (the solvers stop at ~1e-12; see src/core/limits.ts): a
 * departure from linearity below it is noise, not curvature.
 */
const ROUNDING = 1e-10;

/** Named parameter values (SI units) and the covariance of some of them. */
export interface ParameterCovariance {
  /** Every parameter's value. */
  values: Readonly<Record<string, number>>;
  /** The parameters that have an uncertainty, in the order of `covariance`. */
  names: readonly string[];
  covariance: readonly (readonly number[])[];
}

/** Central-difference step, as a fraction of a parameter's standard uncertainty (see above). */
export const UNCERTAINTY_STEP = 0.01;

/**
 * Smallest step, relative to max(|value|, scale): below it the results' own rounding (~1e-12
 * relative) would swamp the difference (the forward step of ./levenbergMarquardt.ts, FORWARD_STEP).
 */
const MIN_STEP = FORWARD_STEP;

/**
 * u(r) for r(values), linear propagation over the parameters of `p` (see above); `k` (default 2)
 * is the band, in standard uncertainties, over which r must exist and be nearly linear; `what`
 * names r in messages; `known` is r at the parameters when the caller has it already. Fails 'none'
 * where r stops existing within the band, 'range' where it is too far from linear there.
 */
export function propagateOver(p: ParameterCovariance, result: (values: Record<string, number>) => number, what = 'the result', k = 2, known?: number): Uncertainty {
  const C = p.covariance;
  const n = p.names.length;
  if (!(k > 0)) fail('input', `the band must be a positive number of standard uncertainties (got ${k})`);
  if (C.length !== n || C.some((row) => row.length !== n)) fail('input', `the covariance must be ${n} x ${n}, one row and column per parameter (${p.names.join(', ')})`);
  const theta = p.names.map((name) => p.values[name]);
  const valuesAt = (t: readonly number[]) => {
    const v = { ...p.values };
    p.names.forEach((name, j) => { v[name] = t[j]; });
    return v;
  };
  const at = (t: readonly number[]): number | MixgapError => {
    try {
      return result(valuesAt(t));
    } catch (e) {
      if (e instanceof MixgapError) return e;
      throw e;
    }
  };
  const value = known ?? result(valuesAt(theta));
  const gradient = theta.map((v, j) => {
    const u = Math.sqrt(Math.max(0, C[j][j]));
    if (u === 0) return 0;
    const h = Math.max(UNCERTAINTY_STEP * u, MIN_STEP * Math.max(Math.abs(v), parameterUnit(p.names[j], 1000)));
    const plus = at(theta.map((w, i) => (i === j ? w + h : w)));
    const minus = at(theta.map((w, i) => (i === j ? w - h : w)));
    for (const [r, sign] of [[plus, '+'], [minus, '-']] as const) {
      if (typeof r !== 'number') {
        fail('none', `${what} does not exist everywhere within ${k} standard uncertainties of the parameters (at ${p.names[j]} ${sign} ${h.toPrecision(3)}: ${r.message}), so it has no uncertainty to state`);
      }
    }
    return ((plus as number) - (minus as number)) / (2 * h);
  });
  if (gradient.every((g) => g === 0)) {
    // No direction of change: r must then stay put at the ends of the band along each parameter
    // (a phase fraction of 0 just outside a gap that the band reaches would not).
    p.names.forEach((name, j) => {
      const u = Math.sqrt(Math.max(0, C[j][j]));
      for (const sign of [1, -1]) {
        if (u === 0) continue;
        const r = at(theta.map((w, i) => (i === j ? w + sign * k * u : w)));
        if (typeof r !== 'number') fail('none', `${what} does not exist everywhere within ${k} standard uncertainties of the parameters (at ${name} = ${(theta[j] + sign * k * u).toPrecision(6)}: ${r.message}), so it has no uncertainty to state`);
        if (!(Math.abs(r - value) <= ROUNDING * Math.abs(value))) fail('range', `${what} does not change for small changes of the parameters but does within ${k} standard uncertainties (${r.toPrecision(6)} instead of ${value.toPrecision(6)} at ${name} = ${(theta[j] + sign * k * u).toPrecision(6)}): it jumps there, and linear propagation cannot state its uncertainty`);
      }
    });
  }
  return bandChecked(value, gradient, C, theta, at, p.names, what, k, 'standard uncertainties of the parameters', 'it is undefined for some parameter values the uncertainties allow');
}

/**
 * u(r) from the gradient, after r has been evaluated at theta +- delta (the ends of the band along
 * the direction of fastest change): fails where r does not exist there or is too far from linear.
 */
function bandChecked(
  value: number, gradient: number[], C: readonly (readonly number[])[], theta: readonly number[],
  at: (t: readonly number[]) => number | MixgapError, names: readonly string[], what: string, k: number, band: string, remedy: string,
): Uncertainty {
  const Cg = C.map((row) => row.reduce((s, c, i) => s + c * gradient[i], 0));
  const variance = gradient.reduce((s, g, j) => s + g * Cg[j], 0);
  const sigma = Math.sqrt(Math.max(0, variance));
  if (sigma === 0) return { value, sigma, gradient };

  const delta = Cg.map((v) => (k * v) / sigma);
  for (const sign of [1, -1]) {
    const t = theta.map((v, j) => v + sign * delta[j]);
    const r = at(t);
    const where = () => names.map((n, j) => `${n} = ${t[j].toPrecision(6)}`).join(', ');
    if (typeof r !== 'number') {
      fail('none', `${what} does not exist everywhere within ${k} ${band} (at ${where()}: ${r.message}), so it has no uncertainty to state; ${remedy}`);
    }
    const off = Math.abs(r - (value + sign * k * sigma));
    if (!(off <= Math.max(MAX_NONLINEARITY * k * sigma, ROUNDING * Math.abs(value)))) {
      fail('range', `${what} is too far from linear within ${k} ${band} (at ${where()} it is ${r.toPrecision(6)}, the linear estimate ${(value + sign * k * sigma).toPrecision(6)}): linear propagation would misstate its uncertainty, as near a critical point`);
    }
  }
  return { value, sigma, gradient };
}

export function propagate(fit: Fit, result: (model: BinaryModel) => number, what = 'the result', k = 2): Uncertainty {
  const C = fit.covariance;
  if (!C) fail('none', `the fit has no covariance (as many measured quantities as free parameters, so nothing to estimate the scatter from): state absolute uncertainties or add measurements`);
  if (!(k > 0)) fail('input', `the band must be a positive number of standard deviations (got ${k})`);
  const theta = fit.free.map((name) => fit.values[name]);
  const units = fit.units ?? fit.free.map((name) => parameterUnit(name, 1000));
  if (C.length !== theta.length || C.some((row) => row.length !== theta.length)) fail('input', `the covariance must be ${theta.length} x ${theta.length}, one row and column per free parameter (${fit.free.join(', ')})`);
  const value = result(modelAt(fit, theta));
  const at = (t: readonly number[]): number | MixgapError => {
    try {
      return result(modelAt(fit, t));
    } catch (e) {
      if (e instanceof MixgapError) return e;
      throw e;
    }
  };
  const gradient = theta.map((_, j) => {
    const h = fdStep(theta, units, j, FORWARD_STEP);
    const plus = at(theta.map((v, i) => (i === j ? v + h : v)));
    if (typeof plus === 'number') return (plus - value) / h;
    const minus = at(theta.map((v, i) => (i === j ? v - h : v)));
    if (typeof minus === 'number') return (value - minus) / h;
    return fail('range', `${what} has no derivative with respect to ${fit.free[j]}: it stops existing when ${fit.free[j]} moves by ${h.toPrecision(3)} either way (${minus.message})`);
  });
  return bandChecked(value, gradient, C, theta, at, fit.free, what, k, 'standard deviations of the fitted parameters', 'add measurements to narrow the parameters');
}
