/**
 * Mixgap cell functions. Each function reads its arguments (./args), calls the core and lets
 * `cell` turn core failures into cell errors. The JSDoc tags below are the source of
 * functions.json (generated at build time); Excel and the embedded engine both use them.
 *
 * Parameter argument `params` everywhere: a single number (regular solution, Omega in J/mol) or a
 * range of Redlich–Kister rows a, b, c with L_k(T) = a + b T + c T ln T (J/mol, J/(mol K)).
 * Compositions are mole fractions of component B; temperatures are in kelvin.
 */
import { criticalPoint } from '../core/critical';
import { criticalPointsOf, equilibriumAt, gapAt, unstableAt } from '../core/equilibrium';
import { gapTable as coreGapTable } from '../core/gapTable';
import { gapTemperature } from '../core/gapTemperature';
import { leverFractions } from '../core/leverRule';
import { cell, cellOf, fraction, kelvin, number, ordinal, phaseSide, system } from './args';
import { CellFailure } from './errors';

/**
 * Low (A-rich) boundary of a miscibility gap: the mole fraction of B of the A-rich phase that
 * coexists at temperature T (binodal).
 * @customfunction
 * @param T Temperature in kelvin.
 * @param params Omega in J/mol (regular solution), or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [gap] Which gap when there are several at T, numbered from low x (default 1).
 * @returns Mole fraction of B at the A-rich side of the gap.
 */
export function gapLow(T: number, params: any[][], gap?: number): number {
  return cell(() => gapAt(system(params).model, kelvin(T), ordinal(gap, 'gap')).low.x);
}

/**
 * High (B-rich) boundary of a miscibility gap: the mole fraction of B of the B-rich phase that
 * coexists at temperature T (binodal).
 * @customfunction
 * @param T Temperature in kelvin.
 * @param params Omega in J/mol (regular solution), or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [gap] Which gap when there are several at T, numbered from low x (default 1).
 * @returns Mole fraction of B at the B-rich side of the gap.
 */
export function gapHigh(T: number, params: any[][], gap?: number): number {
  return cell(() => gapAt(system(params).model, kelvin(T), ordinal(gap, 'gap')).high.x);
}

/**
 * Number of miscibility gaps at temperature T (0 when the solution is homogeneous).
 * @customfunction
 * @param T Temperature in kelvin.
 * @param params Omega in J/mol (regular solution), or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @returns Number of gaps.
 */
export function gapCount(T: number, params: any[][]): number {
  return cell(() => equilibriumAt(system(params).model, kelvin(T)).gaps.length);
}

/**
 * Low end of an unstable interval (spinodal, where d2g/dx2 = 0) at temperature T.
 * @customfunction
 * @param T Temperature in kelvin.
 * @param params Omega in J/mol (regular solution), or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [interval] Which unstable interval when there are several, numbered from low x (default 1).
 * @returns Mole fraction of B at the low spinodal point.
 */
export function spinLow(T: number, params: any[][], interval?: number): number {
  return cell(() => unstableAt(system(params).model, kelvin(T), ordinal(interval, 'interval'))[0]);
}

/**
 * High end of an unstable interval (spinodal, where d2g/dx2 = 0) at temperature T.
 * @customfunction
 * @param T Temperature in kelvin.
 * @param params Omega in J/mol (regular solution), or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [interval] Which unstable interval when there are several, numbered from low x (default 1).
 * @returns Mole fraction of B at the high spinodal point.
 */
export function spinHigh(T: number, params: any[][], interval?: number): number {
  return cell(() => unstableAt(system(params).model, kelvin(T), ordinal(interval, 'interval'))[1]);
}

/**
 * Temperature of a critical (consolute) point, where a gap closes. Critical points between 1 K and
 * 20000 K are numbered by temperature, highest first; CRITKIND tells upper from lower.
 * @customfunction
 * @param params Omega in J/mol (regular solution), or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [n] Which critical point, 1 = highest temperature (default 1).
 * @returns Critical temperature in kelvin.
 */
export function tCrit(params: any[][], n?: number): number {
  return cell(() => {
    const { model } = system(params);
    return criticalPoint(criticalPointsOf(model), ordinal(n, 'n')).T;
  });
}

/**
 * Composition of a critical (consolute) point, numbered as in TCRIT (highest temperature first).
 * @customfunction
 * @param params Omega in J/mol (regular solution), or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [n] Which critical point, 1 = highest temperature (default 1).
 * @returns Mole fraction of B at the critical point.
 */
export function xCrit(params: any[][], n?: number): number {
  return cell(() => {
    const { model } = system(params);
    return criticalPoint(criticalPointsOf(model), ordinal(n, 'n')).x;
  });
}

/**
 * Kind of a critical point, numbered as in TCRIT: "upper" (the gap exists just below it) or
 * "lower" (the gap exists just above it).
 * @customfunction
 * @param params Omega in J/mol (regular solution), or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [n] Which critical point, 1 = highest temperature (default 1).
 * @returns "upper" or "lower".
 */
export function critKind(params: any[][], n?: number): string {
  return cell(() => {
    const { model } = system(params);
    return criticalPoint(criticalPointsOf(model), ordinal(n, 'n')).kind;
  });
}

/**
 * Number of critical points between 1 K and 20000 K.
 * @customfunction
 * @param params Omega in J/mol (regular solution), or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @returns Number of critical points (0 when no gap closes in that range).
 */
export function critCount(params: any[][]): number {
  return cell(() => criticalPointsOf(system(params).model).length);
}

/**
 * Lever-rule fraction of one phase for an overall composition x0 at temperature T. Inside a gap
 * the B-rich ("high") phase has (x0 - x')/(x'' - x'). Outside every gap the material is one phase
 * and the result is 0 or 1: the phase is "low" when x0 lies below the nearest gap and "high"
 * above it; with no gap at T, "low" for x0 up to 1/2 and "high" above.
 * @customfunction
 * @param x0 Overall mole fraction of B.
 * @param T Temperature in kelvin.
 * @param params Omega in J/mol (regular solution), or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [phase] "high" for the B-rich phase (default) or "low" for the A-rich phase.
 * @returns Mole fraction of the material in that phase, between 0 and 1.
 */
export function phaseFrac(x0: number, T: number, params: any[][], phase?: string): number {
  return cell(() => {
    const x = fraction(x0, 'x0');
    const side = phaseSide(phase);
    const { gaps } = equilibriumAt(system(params).model, kelvin(T));
    let high: number;
    const containing = gaps.find((g) => g.low.x <= x && x <= g.high.x);
    if (containing) high = leverFractions(x, containing).high;
    else if (gaps.length === 0) high = x <= 0.5 ? 0 : 1;
    else {
      const distance = (g: (typeof gaps)[number]) => (x < g.low.x ? g.low.x - x : x - g.high.x);
      const nearest = gaps.reduce((a, b) => (distance(b) < distance(a) ? b : a));
      high = x < nearest.low.x ? 0 : 1;
    }
    return side === 'high' ? high : 1 - high;
  });
}

/**
 * Gap temperature of a composition: the highest temperature (1 K to 20000 K) at which x0 lies on
 * a binodal, i.e. where a homogeneous solution of composition x0 starts to separate on cooling
 * below an upper critical point.
 * @customfunction
 * @param x0 Overall mole fraction of B.
 * @param params Omega in J/mol (regular solution), or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @returns Temperature in kelvin.
 */
export function tGap(x0: number, params: any[][]): number {
  return cell(() => {
    const x = fraction(x0, 'x0');
    const { model } = system(params);
    return gapTemperature(model, x, criticalPointsOf(model));
  });
}

/**
 * Molar Gibbs energy of mixing g(x, T) relative to the pure components.
 * @customfunction
 * @param x Mole fraction of B.
 * @param T Temperature in kelvin.
 * @param params Omega in J/mol (regular solution), or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @returns Gibbs energy of mixing in J/mol.
 */
export function gMix(x: number, T: number, params: any[][]): number {
  return cell(() => {
    const xB = fraction(x);
    return system(params).model.at(kelvin(T)).g(xB, 1 - xB);
  });
}

/**
 * A chart-ready table of one gap between two temperatures: columns T (K), binodal low, binodal
 * high, spinodal low, spinodal high (mole fractions of B); one row per temperature, evenly spaced.
 * A critical temperature inside the range replaces the nearest row, with the critical
 * composition in all four columns, so the dome closes. Where the gap does not exist, #N/A.
 * @customfunction
 * @param T1 First temperature in kelvin.
 * @param T2 Last temperature in kelvin.
 * @param rows Number of rows (2 to 10000); write it as a number in the formula.
 * @param params Omega in J/mol (regular solution), or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [gap] Which gap, numbered from low x at each temperature (default 1).
 * @returns rows x 5 table: T, binodal low, binodal high, spinodal low, spinodal high.
 */
export function gapTable(T1: number, T2: number, rows: number, params: any[][], gap?: number): any[][] {
  return cell(() => {
    const from = kelvin(T1, 'T1'), to = kelvin(T2, 'T2');
    const n = number(rows, 'rows');
    if (!(Number.isInteger(n) && n >= 2 && n <= 10000)) {
      throw new CellFailure('#NUM!', `rows = ${n}: give a whole number of rows from 2 to 10000`);
    }
    const which = ordinal(gap, 'gap');
    const { model } = system(params);
    const missing = new CellFailure('#N/A', `gap ${which} does not exist at this temperature`);
    const value = (v: number) => cellOf(Number.isNaN(v) ? missing : v);
    return coreGapTable(model, from, to, n, which, criticalPointsOf(model)).map((r) => [
      r.T, value(r.low), value(r.high), value(r.spinLow), value(r.spinHigh),
    ]);
  });
}
