/**
 * From measurements to parameters: cell functions that fit model coefficients to measured
 * tie-lines, critical points and mutual solubilities, report how well they fit, and convert
 * compositions between mole and mass fractions. Argument reading is here; numerics in src/core.
 *
 * The fit functions spill tables that other functions take directly as their `params` argument:
 * Redlich–Kister rows a, b, c (FITTIELINES, FITCRIT) or an NRTL parameter card (FITNRTL).
 */
import { boundaryResidual } from '../core/fit/residuals';
import { equilibriumAt } from '../core/equilibrium';
import { fitCriticalPoint } from '../core/fit/criticalPoint';
import { fitNrtlSolubilities } from '../core/fit/nrtlSolubility';
import { fitTieLines as fitTieLinesCore, type TieLine, type TieLineFit } from '../core/fit/tieLines';
import { massFraction, massPhaseFractions, molarMass as formulaMass, moleFraction } from '../core/composition';
import { cell, cellOf, fraction, number, ordinal, phaseSide, system, temperatureIn } from './args';
import { choice, gridNumber, isEmpty, toGrid } from './cells';
import { CellFailure } from './errors';
import { MAX_FIT_TERMS } from './shapes';

/**
 * Redlich–Kister coefficients fitted to measured tie-lines (T, x', x''): equal chemical potentials
 * in both phases, solved as weighted linear least squares so that each residual reads as a
 * composition error. Spills one row per term, columns a, b, c of L_k = a + b T + c T ln T
 * (J/mol, J/(mol K), J/(mol K)); the table works directly as the params of GAPLOW and the others.
 * @customfunction
 * @helpurl https://localhost:3000/help/FITTIELINES.html
 * @param data Tie-lines, one row each: T (K), x' (A-rich phase), x'' (B-rich phase), mole fractions of B. A first row of column titles is skipped.
 * @param terms Number of Redlich–Kister terms L0, L1, ... to fit (1 to 6); write it as a number in the formula.
 * @param [slopes] TRUE to give every term a temperature slope b, FALSE (default) for none, or one TRUE/FALSE per term, e.g. {TRUE,FALSE}.
 * @param [result] "coefficients" (default) or "errors": standard errors of a and b in the same layout (#N/A where not fitted).
 * @returns terms x 3 table: a, b, c of each term.
 */
export function fitTieLines(data: any[][], terms: number, slopes?: any[][], result?: string): any[][] {
  return cell(() => {
    const fit = tieLineFit(data, terms, slopes);
    const what = resultKind(result);
    if (what === 'coefficients') return fit.terms.map((t) => [t.a, t.b, t.c]);
    if (!fit.errors) {
      throw new CellFailure('#N/A', 'the tie-lines determine the coefficients exactly (as many equations as coefficients): no residual is left to estimate standard errors; add tie-lines');
    }
    const notFitted = (name: string, k: number) => cellOf(new CellFailure('#N/A', `${name} of L${k} was not fitted (fixed at 0)`));
    return fit.errors.map((e, k) => [e.a, e.b !== undefined ? e.b : notFitted('b', k), notFitted('c', k)]);
  });
}

/**
 * How a tie-line fit went, in one line: coefficients, equations, degrees of freedom, the root mean
 * square composition residual of the weighted equations and the condition number.
 * @customfunction
 * @helpurl https://localhost:3000/help/FITINFO.html
 * @param data Tie-lines, one row each: T (K), x' (A-rich phase), x'' (B-rich phase), mole fractions of B. A first row of column titles is skipped.
 * @param terms Number of Redlich–Kister terms L0, L1, ... (1 to 6).
 * @param [slopes] TRUE for a temperature slope on every term, FALSE (default) for none, or one TRUE/FALSE per term.
 * @returns One-line summary of the fit.
 */
export function fitInfo(data: any[][], terms: number, slopes?: any[][]): string {
  return cell(() => {
    const fit = tieLineFit(data, terms, slopes);
    const p = fit.terms.length + fit.terms.filter((t) => t.b !== 0).length;
    const n = p + fit.dof;
    const fitted = fit.dof > 0
      ? `${fit.dof} degree${fit.dof > 1 ? 's' : ''} of freedom; rms composition residual ${round(fit.rms)}`
      : 'exactly determined (no residual to judge the fit by)';
    return `${fit.terms.length} term${fit.terms.length > 1 ? 's' : ''}, ${p} coefficients from ${n / 2} tie-line${n > 2 ? 's' : ''} (${n} equations); ${fitted}; condition number ${round(fit.condition)}`;
  });
}

/**
 * Redlich–Kister coefficients that put a critical (consolute) point at a measured temperature and,
 * when known, composition: g'' = g''' = 0 there. Without xc one term L0 = 2 R Tc (critical point at
 * x = 1/2); with xc two constant terms. Spills 2 rows (L0, L1; L1 = 0 without xc) x 3 columns a, b, c.
 * @customfunction
 * @helpurl https://localhost:3000/help/FITCRIT.html
 * @param Tc Critical temperature (K).
 * @param [xc] Critical mole fraction of B (default 1/2).
 * @returns 2 x 3 table: a, b, c of L0 and L1.
 */
export function fitCrit(Tc: number, xc?: number): any[][] {
  return cell(() => {
    const T = number(Tc, 'Tc');
    if (!(T > 0)) throw new CellFailure('#NUM!', `Tc = ${T}: give the critical temperature in kelvin, above 0`);
    const x = isEmpty(xc) ? undefined : fraction(xc, 'xc');
    return fitCriticalPoint(T, x).map((t) => [t.a, t.b, t.c]);
  });
}

/**
 * NRTL taus from one measured pair of mutual solubilities at temperature T, for a chosen alpha:
 * the two equal-activity conditions solved by Newton's method. Spills an NRTL parameter card
 * (6 rows x 2 columns) that works directly as params: with form "1/T" (default) tau_ij = b_ij / T,
 * so tau12 = b12 / T at the measured T; with form "constant" a12 and a21 are the taus themselves.
 * @customfunction
 * @helpurl https://localhost:3000/help/FITNRTL.html
 * @param T Temperature of the measurement (K).
 * @param xLow Mole fraction of B in the A-rich phase (x').
 * @param xHigh Mole fraction of B in the B-rich phase (x'').
 * @param alpha NRTL non-randomness (typically 0.2 to 0.47).
 * @param [form] "1/T" (default: tau = b/T, energies constant) or "constant" (tau = a, independent of T).
 * @returns 6 x 2 parameter card: model, a12, b12, a21, b21, alpha.
 */
export function fitNrtl(T: number, xLow: number, xHigh: number, alpha: number, form?: string): any[][] {
  return cell(() => {
    const TK = number(T, 'T');
    if (!(TK > 0)) throw new CellFailure('#NUM!', `T = ${TK}: give the temperature in kelvin, above 0`);
    const x1 = fraction(xLow, 'xLow'), x2 = fraction(xHigh, 'xHigh');
    if (!(x1 < x2)) throw new CellFailure('#NUM!', `xLow = ${x1} must be below xHigh = ${x2}: xLow is the A-rich phase`);
    const a = number(alpha, 'alpha');
    const kind = nrtlForm(form);
    const { tau12, tau21 } = fitNrtlSolubilities(TK, x1, x2, a);
    const [a12, b12, a21, b21] = kind === 'constant' ? [tau12, 0, tau21, 0] : [0, tau12 * TK, 0, tau21 * TK];
    return [['model', 'nrtl'], ['a12', a12], ['b12', b12], ['a21', a21], ['b21', b21], ['alpha', a]];
  });
}

/**
 * Residual of a measured gap boundary: the model's binodal composition at T (the core's
 * common-tangent solver) minus the measured one, on the side given. Positive when the model's
 * boundary lies at higher x. #N/A when the model has no gap at T.
 * @customfunction
 * @helpurl https://localhost:3000/help/GAPRESID.html
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param x Measured mole fraction of B on that boundary.
 * @param params Parameter card, Omega in J/mol, or Redlich–Kister rows a, b, c (for example the table FITTIELINES spills).
 * @param phase "low" for the A-rich boundary x', "high" for the B-rich boundary x''.
 * @param [gap] Which gap, numbered from low x; default: the one whose boundary on that side is nearest to x.
 * @returns Model minus measured mole fraction.
 */
export function gapResid(T: number, x: number, params: any[][], phase: string, gap?: number): number {
  return cell(() => {
    const sys = system(params);
    const TK = temperatureIn(sys, T);
    const measured = fraction(x, 'x');
    const side = requiredSide(phase);
    const n = isEmpty(gap) ? undefined : ordinal(gap, 'gap');
    return boundaryResidual(equilibriumAt(sys.model, TK), measured, side, n);
  });
}

/**
 * Mass fraction of B from its mole fraction (atom fraction for alloys).
 * @customfunction
 * @helpurl https://localhost:3000/help/MASSFRAC.html
 * @param x Mole fraction of B, 0 to 1.
 * @param A Molar mass of A in g/mol, or its formula or element symbol ("H2O", "Fe").
 * @param B Molar mass of B in g/mol, or its formula or element symbol.
 * @returns Mass fraction of B.
 */
export function massFrac(x: number, A: any, B: any): number {
  return cell(() => massFraction(unit(x, 'x'), molarMassOf(A, 'A'), molarMassOf(B, 'B')));
}

/**
 * Mole fraction of B (atom fraction for alloys) from its mass fraction.
 * @customfunction
 * @helpurl https://localhost:3000/help/MOLEFRAC.html
 * @param w Mass fraction of B, 0 to 1.
 * @param A Molar mass of A in g/mol, or its formula or element symbol ("H2O", "Fe").
 * @param B Molar mass of B in g/mol, or its formula or element symbol.
 * @returns Mole fraction of B.
 */
export function moleFrac(w: number, A: any, B: any): number {
  return cell(() => moleFraction(unit(w, 'w'), molarMassOf(A, 'A'), molarMassOf(B, 'B')));
}

/**
 * Weight percent of B from its mole percent (atom percent for alloys).
 * @customfunction
 * @helpurl https://localhost:3000/help/WTPCT.html
 * @param molPercent Mole (atom) percent of B, 0 to 100.
 * @param A Molar mass of A in g/mol, or its formula or element symbol.
 * @param B Molar mass of B in g/mol, or its formula or element symbol.
 * @returns Weight percent of B.
 */
export function wtPct(molPercent: number, A: any, B: any): number {
  return cell(() => 100 * massFraction(percent(molPercent, 'molPercent'), molarMassOf(A, 'A'), molarMassOf(B, 'B')));
}

/**
 * Mole percent (atom percent for alloys) of B from its weight percent.
 * @customfunction
 * @helpurl https://localhost:3000/help/MOLPCT.html
 * @param wtPercent Weight percent of B, 0 to 100.
 * @param A Molar mass of A in g/mol, or its formula or element symbol.
 * @param B Molar mass of B in g/mol, or its formula or element symbol.
 * @returns Mole percent of B.
 */
export function molPct(wtPercent: number, A: any, B: any): number {
  return cell(() => 100 * moleFraction(percent(wtPercent, 'wtPercent'), molarMassOf(A, 'A'), molarMassOf(B, 'B')));
}

/**
 * Molar mass of a chemical formula from the IUPAC 2021 standard atomic weights: element symbols with
 * counts, groups in parentheses, hydrates with a middle dot ("CuSO4·5H2O").
 * @customfunction
 * @helpurl https://localhost:3000/help/MOLARMASS.html
 * @param formula Chemical formula, e.g. "H2O", "C6H5OH", "Fe".
 * @returns Molar mass (g/mol).
 */
export function molarMass(formula: string): number {
  return cell(() => molarMassOf(formula, 'formula'));
}

/**
 * Lever rule on a mass basis: the mass fraction of a batch of overall mole fraction x0 that is in
 * one phase of a gap (x', x''), for yield and cost sheets. 0 or 1 outside the gap.
 * @customfunction
 * @helpurl https://localhost:3000/help/PHASEMASSFRAC.html
 * @param x0 Overall mole fraction of B.
 * @param xLow Mole fraction of B of the A-rich phase (x', e.g. from GAPLOW).
 * @param xHigh Mole fraction of B of the B-rich phase (x'', e.g. from GAPHIGH).
 * @param A Molar mass of A in g/mol, or its formula or element symbol.
 * @param B Molar mass of B in g/mol, or its formula or element symbol.
 * @param [phase] "high" for the B-rich phase (default) or "low" for the A-rich phase.
 * @returns Mass fraction of the batch in that phase, 0 to 1.
 */
export function phaseMassFrac(x0: number, xLow: number, xHigh: number, A: any, B: any, phase?: string): number {
  return cell(() => massSplit(x0, xLow, xHigh, A, B, phase));
}

/**
 * Mass of a batch that ends up in one phase of a gap (x', x''): batch mass times PHASEMASSFRAC.
 * @customfunction
 * @helpurl https://localhost:3000/help/PHASEMASS.html
 * @param batch Mass of the batch (any unit; the result has the same unit).
 * @param x0 Overall mole fraction of B.
 * @param xLow Mole fraction of B of the A-rich phase (x').
 * @param xHigh Mole fraction of B of the B-rich phase (x'').
 * @param A Molar mass of A in g/mol, or its formula or element symbol.
 * @param B Molar mass of B in g/mol, or its formula or element symbol.
 * @param [phase] "high" for the B-rich phase (default) or "low" for the A-rich phase.
 * @returns Mass in that phase.
 */
export function phaseMass(batch: number, x0: number, xLow: number, xHigh: number, A: any, B: any, phase?: string): number {
  return cell(() => {
    const m = number(batch, 'batch');
    if (!(m >= 0)) throw new CellFailure('#NUM!', `batch = ${m}: a mass cannot be negative`);
    return m * massSplit(x0, xLow, xHigh, A, B, phase);
  });
}

// ---------------------------------------------------------------------------------------------

function tieLineFit(data: unknown, terms: unknown, slopes: unknown): TieLineFit {
  const n = number(terms, 'terms');
  if (!(Number.isInteger(n) && n >= 1 && n <= MAX_FIT_TERMS)) {
    throw new CellFailure('#NUM!', `terms = ${n}: give a whole number of Redlich–Kister terms from 1 to ${MAX_FIT_TERMS}`);
  }
  return fitTieLinesCore(tieLines(data), slopeFlags(slopes, n));
}

/** Reads the tie-line range: rows T, x', x''; empty rows skipped; a first row of titles skipped. */
function tieLines(data: unknown): TieLine[] {
  const grid = toGrid(data);
  const out: TieLine[] = [];
  grid.forEach((row, i) => {
    if (row.every(isEmpty)) return;
    if (i === 0 && row.some((v) => typeof v === 'string' && v.trim() !== '')) return; // column titles
    if (row.slice(3).some((v) => !isEmpty(v))) {
      throw new CellFailure('#VALUE!', `data row ${i + 1} has more than 3 cells: give T, x' and x'' only`);
    }
    const cells = [0, 1, 2].map((c) => {
      const v = row[c];
      const name = ['T', "x'", "x''"][c];
      if (isEmpty(v)) throw new CellFailure('#VALUE!', `data row ${i + 1}: ${name} is empty; each row needs T, x' and x''`);
      return gridNumber(v, `data row ${i + 1}: ${name}`);
    });
    const [T, x1, x2] = cells;
    if (!(T > 0)) throw new CellFailure('#NUM!', `data row ${i + 1}: T = ${T} K is not above 0 K`);
    for (const [v, name] of [[x1, "x'"], [x2, "x''"]] as const) {
      if (!(v > 0 && v < 1)) throw new CellFailure('#NUM!', `data row ${i + 1}: ${name} = ${v} must be a mole fraction strictly between 0 and 1`);
    }
    if (!(x1 < x2)) throw new CellFailure('#NUM!', `data row ${i + 1}: x' = ${x1} must be below x'' = ${x2} (the A-rich phase in the second column)`);
    out.push({ T, xLow: x1, xHigh: x2 });
  });
  if (out.length === 0) throw new CellFailure('#VALUE!', "data holds no tie-lines: give rows of T, x', x''");
  return out;
}

/** TRUE/FALSE for all terms, or one per term. */
function slopeFlags(value: unknown, terms: number): boolean[] {
  const flat = toGrid(value).flat().filter((v) => !isEmpty(v));
  const flag = (v: unknown): boolean => {
    if (typeof v === 'boolean') return v;
    if (v === 0 || v === 1) return v === 1;
    throw new CellFailure('#VALUE!', `slopes holds ${JSON.stringify(v)}: write TRUE or FALSE (or 1 or 0)`);
  };
  if (flat.length === 0) return new Array<boolean>(terms).fill(false);
  if (flat.length === 1) return new Array<boolean>(terms).fill(flag(flat[0]));
  if (flat.length !== terms) {
    throw new CellFailure('#VALUE!', `slopes has ${flat.length} values for ${terms} terms: give one TRUE/FALSE per term, or a single one for all`);
  }
  return flat.map(flag);
}

function resultKind(value: unknown): 'coefficients' | 'errors' {
  return choice(value, 'result', { coefficients: '', errors: '' }, 'coefficients');
}

function nrtlForm(value: unknown): '1/T' | 'constant' {
  return choice(value, 'form', { '1/T': 'tau = b/T', constant: 'tau = a' }, '1/T');
}

/** The side of a measured gap boundary (required). */
function requiredSide(value: unknown): 'low' | 'high' {
  return choice(value, 'phase', { low: "the A-rich boundary x'", high: "the B-rich boundary x''" });
}

/** A fraction from 0 to 1 inclusive. */
function unit(value: unknown, name: string): number {
  const v = number(value, name);
  if (!(v >= 0 && v <= 1)) throw new CellFailure('#NUM!', `${name} = ${v} must lie between 0 and 1`);
  return v;
}

/** A percentage from 0 to 100, as a fraction. */
function percent(value: unknown, name: string): number {
  const v = number(value, name);
  if (!(v >= 0 && v <= 100)) throw new CellFailure('#NUM!', `${name} = ${v} must lie between 0 and 100`);
  return v / 100;
}

/** A molar mass: a positive number (g/mol) or a formula. */
function molarMassOf(value: unknown, name: string): number {
  if (typeof value === 'number') {
    if (!(Number.isFinite(value) && value > 0)) throw new CellFailure('#NUM!', `${name} = ${value}: a molar mass must be a positive number of g/mol`);
    return value;
  }
  if (typeof value === 'string' && value.trim() !== '') return formulaMass(value.trim());
  throw new CellFailure('#VALUE!', `${name} is ${isEmpty(value) ? 'empty' : JSON.stringify(value)}: give a molar mass in g/mol or a formula such as "H2O" or "Fe"`);
}

function massSplit(x0: unknown, xLow: unknown, xHigh: unknown, A: unknown, B: unknown, phase: unknown): number {
  const side = phaseSide(phase);
  const x = unit(x0, 'x0'), x1 = unit(xLow, 'xLow'), x2 = unit(xHigh, 'xHigh');
  if (!(x1 < x2)) throw new CellFailure('#NUM!', `xLow = ${x1} must be below xHigh = ${x2}: xLow is the A-rich phase`);
  const f = massPhaseFractions(x, x1, x2, molarMassOf(A, 'A'), molarMassOf(B, 'B'));
  return side === 'high' ? f.high : f.low;
}

const round = (v: number) => Number(v.toPrecision(3));
