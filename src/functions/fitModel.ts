/**
 * The general fit in cells: any model of the registry, any mix of measurements (tie-lines, boundary
 * points, cloud points, critical points), the free parameters chosen on a start card. FITMODEL
 * spills the fitted parameter card (with u() and r() rows, the card form that carries its
 * uncertainty), FITSUMMARY says in one line how the fit went, FITRESID spills each data row's
 * residuals and FITCOV the covariance of the free parameters. The ranges are read in ./fitInputs.ts;
 * the fit is src/core/fit/nonlinear.ts. The four functions share one fit per distinct input (a
 * bounded cache), so a sheet with all four fits once.
 */
import { formatNumber, MixgapError, type UnitWriter } from '../core/errors';
import { fitModel as fitModelCore, type NonlinearFit } from '../core/fit/nonlinear';
import { parameterDimension } from '../core/fit/parameters';
import { BoundedCache } from '../core/boundedCache';
import { asFailure, cell, number } from './args';
import { choice, isEmpty } from './cells';
import { CellFailure } from './errors';
import { readData, readStartCard, toSI, type DataTable, type StartCard } from './fitInputs';
import { FIT_CARD_ROWS, FIT_COV_MAX, FIT_RESID_MAX } from './shapes';

/**
 * Model parameters fitted to measurements of any kind, spilled as a parameter card that every
 * function takes as params: model, the parameters (fitted and fixed), energy and temperature units,
 * component names, then u(NAME) (standard uncertainty) of each fitted parameter and r(NAME1, NAME2)
 * (correlation) of each pair of them. Units as on the start card.
 * @customfunction
 * @helpurl https://localhost:3000/help/FITMODEL.html
 * @param start Start card: key | value rows as a parameter card, with "fit" in a third column beside each parameter the fit moves (a value there is its start; leave it empty for the default start) and "fixed" or nothing beside the others.
 * @param data Measurements, one per row, kind first: tie-line | T | x' | x''; boundary | T | x | low or high; cloud point | T | x0; critical point | Tc | [xc]; then an optional uncertainty (of the compositions, of T, of Tc; a 6th column: of xc). Temperatures in the start card's unit.
 * @param [weights] "relative" (default: the uncertainties weigh the rows, the scatter of the data sets the parameters' uncertainties) or "absolute" (the uncertainties are standard uncertainties; every row must state one).
 * @param [uncertainty] TRUE (default) to write the u() and r() rows, FALSE to leave them out.
 * @param [rows] Rows to spill (default 24; empty rows after the card); write it as a number in the formula.
 * @returns Parameter card, 2 columns.
 */
export function fitModel(start: any[][], data: any[][], weights?: string, uncertainty?: boolean, rows?: number): any[][] {
  return cell(() => {
    const withU = flag(uncertainty, 'uncertainty', true);
    const limit = isEmpty(rows) ? FIT_CARD_ROWS.default : count(rows, 'rows', FIT_CARD_ROWS.min, FIT_CARD_ROWS.max);
    const { card, fit } = fitted(start, data, weights);
    const out: Array<[string, string | number]> = [['model', card.family.name]];
    for (const p of card.parameters) out.push([p.name, fit.values[p.name] / toSI(p.name, card.energy)]);
    out.push(['energy', card.energy.name], ['temperature', card.temperature.name]);
    if (card.names.A !== undefined) out.push(['name A', card.names.A]);
    if (card.names.B !== undefined) out.push(['name B', card.names.B]);
    if (withU) {
      const { u, r } = uncertainties(card, fit);
      fit.free.forEach((name, j) => out.push([`u(${name})`, u[j]]));
      fit.free.forEach((a, j) => fit.free.forEach((b, k) => { if (k > j) out.push([`r(${a}, ${b})`, r[j][k]]); }));
    }
    if (out.length > limit) {
      throw new CellFailure('#VALUE!', `the fitted card has ${out.length} rows but rows = ${limit}${isEmpty(rows) ? ' (the default)' : ''}: write ${out.length} or more as the 5th argument${withU ? ', or leave out the u() and r() rows with FALSE as the 4th' : ''}`);
    }
    return out;
  });
}

/**
 * How a FITMODEL fit went, in one line: each fitted parameter ± its standard uncertainty (two
 * significant digits), measurements and residuals, degrees of freedom, the weighted sum of squares
 * and the reduced chi-square, the condition number.
 * @customfunction
 * @helpurl https://localhost:3000/help/FITSUMMARY.html
 * @param start Start card, as for FITMODEL.
 * @param data Measurements, as for FITMODEL.
 * @param [weights] "relative" (default) or "absolute", as for FITMODEL.
 * @returns One-line summary of the fit.
 */
export function fitSummary(start: any[][], data: any[][], weights?: string): string {
  return cell(() => {
    const { card, fit, table } = fitted(start, data, weights);
    const n = table.measurements.length;
    const p = fit.free.length;
    const stats = fit.covariance ? uncertainties(card, fit) : undefined;
    const params = fit.free.map((name, j) => {
      const v = fit.values[name] / toSI(name, card.energy);
      const unit = unitOf(name, card);
      return `${name} = ${stats ? plusMinus(v, stats.u[j]) : formatNumber(v)}${unit ? ` ${unit}` : ''}`;
    });
    const source = absolute(weights) ? 'from the stated uncertainties' : 'from the scatter of the data';
    const parts = [
      `${card.family.name}: ${params.join(', ')}${stats ? ` (± standard uncertainty, ${source})` : ''}`,
      `${n} measurement${n > 1 ? 's' : ''}, ${fit.rows.length} residual${fit.rows.length > 1 ? 's' : ''}, ${p} fitted parameter${p > 1 ? 's' : ''}, ${fit.dof} degree${fit.dof === 1 ? '' : 's'} of freedom`,
      fit.dof > 0
        ? `weighted sum of squares ${formatNumber(fit.S)}, reduced chi-square ${formatNumber(fit.S / fit.dof)}`
        : `exactly determined (no residual to judge the fit by${stats ? '' : ' or to estimate uncertainties from'})`,
      `condition number ${formatNumber(fit.condition)}`,
    ];
    return parts.join('; ');
  });
}

/**
 * Residuals of a FITMODEL fit, model minus measured, one row per row of the data range (empty for
 * empty and title rows), in the measured quantity's own units: compositions for tie-lines
 * (x', x''), boundary points (x) and xc; temperature differences (K = °C) for cloud points and Tc.
 * @customfunction
 * @helpurl https://localhost:3000/help/FITRESID.html
 * @param start Start card, as for FITMODEL.
 * @param data Measurements, as for FITMODEL.
 * @param [rows] Rows to spill: at least the rows of data; write it as a number in the formula.
 * @returns Rows x 2: the first residual of each row (x', x, T or Tc) and the second (x'' or xc).
 */
export function fitResid(start: any[][], data: any[][], rows?: number): any[][] {
  return cell(() => {
    const { fit, table } = fitted(start, data, undefined);
    if (!isEmpty(rows)) {
      const n = count(rows, 'rows', 1, FIT_RESID_MAX);
      if (n < table.rows) throw new CellFailure('#VALUE!', `rows = ${n}, but data has ${table.rows} rows: write ${table.rows} or more as the 3rd argument`);
    }
    const out: Array<[number | string, number | string]> = Array.from({ length: table.rows }, () => ['', '']);
    const filled = new Array<number>(table.rows).fill(0);
    for (const row of fit.rows) {
      const i = table.rowOf[row.measurement];
      out[i][filled[i]++] = row.residual;
    }
    return out;
  });
}

/**
 * Covariance matrix of the free parameters of a FITMODEL fit, in the start card's units (energies
 * in its energy unit): a first row and column of parameter names around the free x free matrix.
 * @customfunction
 * @helpurl https://localhost:3000/help/FITCOV.html
 * @param start Start card, as for FITMODEL.
 * @param data Measurements, as for FITMODEL.
 * @param [weights] "relative" (default) or "absolute", as for FITMODEL.
 * @param [free] Number of free parameters (the spill is free + 1 square); write it as a number in the formula.
 * @returns (free + 1) x (free + 1) table: names and covariances.
 */
export function fitCov(start: any[][], data: any[][], weights?: string, free?: number): any[][] {
  return cell(() => {
    const { card, fit } = fitted(start, data, weights);
    const p = fit.free.length;
    if (!isEmpty(free)) {
      const n = count(free, 'free', 1, FIT_COV_MAX);
      if (n !== p) throw new CellFailure('#VALUE!', `free = ${n}, but the start card marks ${p} parameter${p > 1 ? 's' : ''} "fit" (${fit.free.join(', ')}): write ${p} as the 4th argument`);
    }
    const C = covariance(fit);
    const f = fit.free.map((name) => toSI(name, card.energy));
    return [['', ...fit.free], ...fit.free.map((name, j) => [name, ...C[j].map((c, k) => c / (f[j] * f[k]))])];
  });
}

// ---------------------------------------------------------------------------------------------

interface Fitted {
  card: StartCard;
  table: DataTable;
  fit: NonlinearFit;
}

/** One fit per distinct (start, data, weights), failures included, shared by the four functions. */
const fits = new BoundedCache<Fitted | CellFailure>(32);

function fitted(start: unknown, data: unknown, weights: unknown): Fitted {
  const key = JSON.stringify([start, data, isEmpty(weights) ? '' : weights], (_, v) => (typeof v === 'number' && !Number.isFinite(v) ? `#${v}` : v));
  const outcome = fits.get(key, () => {
    try {
      return fit(start, data, weights);
    } catch (e) {
      if (e instanceof CellFailure) return e;
      throw e;
    }
  });
  if (outcome instanceof CellFailure) throw outcome;
  return outcome;
}

function fit(start: unknown, data: unknown, weights: unknown): Fitted {
  const card = readStartCard(start);
  const table = readData(data, card.temperature);
  const isAbsolute = absolute(weights);
  if (isAbsolute && !table.allStated) {
    const i = table.measurements.findIndex((m) => (m.kind === 'critical point' ? m.sigmaT === undefined || (m.xc !== undefined && m.sigmaX === undefined) : m.sigma === undefined));
    throw new CellFailure('#VALUE!', `data row ${table.rowOf[i] + 1} states no uncertainty: with weights "absolute" every row needs one (column 5; column 6 for xc of a critical point), or use "relative"`);
  }
  try {
    return { card, table, fit: fitModelCore(card.family, card.parameters, table.measurements, { absolute: isAbsolute }) };
  } catch (e) {
    if (!(e instanceof MixgapError)) throw e;
    // the core numbers measurements from 1 in the order given: name the data range's rows instead
    const text = e.text(writer(card)).replace(/\bmeasurement (\d+)/g, (_, k) => `data row ${table.rowOf[Number(k) - 1] + 1}`);
    throw asFailure(new MixgapError(e.reason, text));
  }
}

function absolute(weights: unknown): boolean {
  return choice(weights, 'weights', {
    relative: 'the uncertainties weigh the rows; the scatter sets the parameters\' uncertainties',
    absolute: 'the uncertainties are standard uncertainties',
  }, 'relative') === 'absolute';
}

/** The covariance, or #N/A saying why there is none. */
function covariance(fit: NonlinearFit): number[][] {
  if (fit.covariance) return fit.covariance;
  throw new CellFailure('#N/A', `the data determine the ${fit.free.length} fitted parameter${fit.free.length > 1 ? 's' : ''} exactly (${fit.rows.length} residuals, no degree of freedom): no scatter is left to estimate uncertainties from; add measurements, or state each row's uncertainty and use weights "absolute" (FITMODEL: or FALSE as its 4th argument to leave out the u() and r() rows)`);
}

/** u in the card's units and the correlation matrix (clamped to [-1, 1] against rounding). */
function uncertainties(card: StartCard, fit: NonlinearFit): { u: number[]; r: number[][] } {
  const C = covariance(fit);
  const s = C.map((row, j) => Math.sqrt(row[j]));
  const u = s.map((v, j) => v / toSI(fit.free[j], card.energy));
  // a parameter with u = 0 (data without any scatter) is correlated with nothing: r = 0
  const r = C.map((row, j) => row.map((c, k) => (s[j] * s[k] > 0 ? Math.max(-1, Math.min(1, c / (s[j] * s[k]))) : j === k ? 1 : 0)));
  return { u, r };
}

/** The unit a card writes a parameter in, for the summary. */
function unitOf(name: string, card: StartCard): string {
  const d = parameterDimension(name);
  return d === 'energy' ? card.energy.name : d === 'energy per K' ? `${card.energy.name} per K` : d === 'K' ? 'K' : '';
}

/**
 * v ± u with u to two significant digits and v to the same decimal place (JCGM 100:2008, GUM,
 * 7.2.6: "at most two significant digits" for a standard uncertainty).
 */
function plusMinus(v: number, u: number): string {
  if (!(u > 0) || !Number.isFinite(u)) return `${formatNumber(v)} ± ${u}`;
  const e = Math.floor(Math.log10(Number(u.toPrecision(2)))) - 1;
  const decimals = Math.max(0, -e);
  const round = (x: number) => (e >= 0 ? String(Math.round(x / 10 ** e) * 10 ** e) : x.toFixed(decimals));
  return `${round(v)} ± ${round(Number(u.toPrecision(2)))}`;
}

function writer(card: StartCard): UnitWriter {
  return {
    temperature: (K) => `${formatNumber(K - card.temperature.offset)} ${card.temperature.name}`,
    energy: (J) => `${formatNumber(J / card.energy.toJoulePerMole)} ${card.energy.name}`,
  };
}

function flag(value: unknown, name: string, fallback: boolean): boolean {
  if (isEmpty(value)) return fallback;
  if (typeof value === 'boolean') return value;
  if (value === 0 || value === 1) return value === 1;
  throw new CellFailure('#VALUE!', `${name} = ${JSON.stringify(value)}: write TRUE or FALSE`);
}

function count(value: unknown, name: string, min: number, max: number): number {
  const n = number(value, name);
  if (!(Number.isInteger(n) && n >= min && n <= max)) throw new CellFailure('#NUM!', `${name} = ${n}: give a whole number from ${min} to ${max}`);
  return n;
}
