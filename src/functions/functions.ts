/**
 * Mixgap cell functions. Each function reads its arguments (./args), calls the core and lets
 * `cell` turn core failures into cell errors. The JSDoc tags below are the source of
 * functions.json (generated at build time); Excel and the embedded engine both use them.
 *
 * Parameter argument `params` everywhere: a single number (regular solution, Omega in J/mol) or a
 * range of Redlich–Kister rows a, b, c with L_k(T) = a + b T + c T ln T (J/mol, J/(mol K)).
 * Compositions are mole fractions of component B (volume fractions for Flory–Huggins); temperatures
 * are in kelvin and energies in J/mol unless a parameter card says otherwise.
 */
import { T_SEARCH_MAX, T_SEARCH_MIN } from '../core/constants';
import { criticalPointOf, criticalPointsOf, crossingsOf, equilibriumAt, gapAt, unstableAt } from '../core/equilibrium';
import { evenTemperatures, gapTable as coreGapTable } from '../core/gapTable';
import { gapTemperature } from '../core/gapTemperature';
import { phaseFractions } from '../core/leverRule';
import { activities, decompositionGain, drivingForce, excessGibbs, expOfLog } from '../core/activity';
import { asFailure, cell, cellOf, component, energyOut, fraction, number, ordinal, phaseSide, system, temperatureIn, temperatureOut, unitsOf } from './args';
import { CellFailure } from './errors';
import { GAPTABLE_ROWS } from './shapes';
import { isTernaryCard, ternarySystem } from './ternaryCard';

/**
 * Low (A-rich) boundary of a miscibility gap: the mole fraction of B of the A-rich phase that
 * coexists at temperature T (binodal).
 * @customfunction
 * @helpurl https://localhost:3000/help/GAPLOW.html
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [gap] Which gap when there are several at T, numbered from low x (default 1).
 * @returns Mole fraction of B at the A-rich side of the gap.
 */
export function gapLow(T: number, params: any[][], gap?: number): number {
  return cell(() => {
    const sys = system(params);
    return gapAt(sys.model, temperatureIn(sys, T), ordinal(gap, 'gap')).low.x;
  });
}

/**
 * High (B-rich) boundary of a miscibility gap: the mole fraction of B of the B-rich phase that
 * coexists at temperature T (binodal).
 * @customfunction
 * @helpurl https://localhost:3000/help/GAPHIGH.html
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [gap] Which gap when there are several at T, numbered from low x (default 1).
 * @returns Mole fraction of B at the B-rich side of the gap.
 */
export function gapHigh(T: number, params: any[][], gap?: number): number {
  return cell(() => {
    const sys = system(params);
    return gapAt(sys.model, temperatureIn(sys, T), ordinal(gap, 'gap')).high.x;
  });
}

/**
 * Number of miscibility gaps at temperature T (0 when the solution is homogeneous).
 * @customfunction
 * @helpurl https://localhost:3000/help/GAPCOUNT.html
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @returns Number of gaps.
 */
export function gapCount(T: number, params: any[][]): number {
  return cell(() => {
    const sys = system(params);
    return equilibriumAt(sys.model, temperatureIn(sys, T)).gaps.length;
  });
}

/**
 * Low end of an unstable interval (spinodal, where d2g/dx2 = 0) at temperature T.
 * @customfunction
 * @helpurl https://localhost:3000/help/SPINLOW.html
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [interval] Which unstable interval when there are several, numbered from low x (default 1).
 * @returns Mole fraction of B at the low spinodal point.
 */
export function spinLow(T: number, params: any[][], interval?: number): number {
  return cell(() => {
    const sys = system(params);
    return unstableAt(sys.model, temperatureIn(sys, T), ordinal(interval, 'interval'))[0];
  });
}

/**
 * High end of an unstable interval (spinodal, where d2g/dx2 = 0) at temperature T.
 * @customfunction
 * @helpurl https://localhost:3000/help/SPINHIGH.html
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [interval] Which unstable interval when there are several, numbered from low x (default 1).
 * @returns Mole fraction of B at the high spinodal point.
 */
export function spinHigh(T: number, params: any[][], interval?: number): number {
  return cell(() => {
    const sys = system(params);
    return unstableAt(sys.model, temperatureIn(sys, T), ordinal(interval, 'interval'))[1];
  });
}

/**
 * Temperature of a critical (consolute) point, where a gap closes. Critical points between 1 K and
 * 20000 K are numbered by temperature, highest first; CRITKIND tells upper from lower.
 * @customfunction
 * @helpurl https://localhost:3000/help/TCRIT.html
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [n] Which critical point, 1 = highest temperature (default 1).
 * @returns Critical temperature (kelvin, or the card's temperature unit).
 */
export function tCrit(params: any[][], n?: number): number {
  return cell(() => {
    const sys = system(params);
    return temperatureOut(sys, criticalPointOf(sys.model, ordinal(n, 'n')).T);
  });
}

/**
 * Composition of a critical (consolute) point, numbered as in TCRIT (highest temperature first).
 * @customfunction
 * @helpurl https://localhost:3000/help/XCRIT.html
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [n] Which critical point, 1 = highest temperature (default 1).
 * @returns Mole fraction of B at the critical point.
 */
export function xCrit(params: any[][], n?: number): number {
  return cell(() => {
    const { model } = system(params);
    return criticalPointOf(model, ordinal(n, 'n')).x;
  });
}

/**
 * Kind of a critical point, numbered as in TCRIT: "upper" (the gap exists just below it) or
 * "lower" (the gap exists just above it).
 * @customfunction
 * @helpurl https://localhost:3000/help/CRITKIND.html
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [n] Which critical point, 1 = highest temperature (default 1).
 * @returns "upper" or "lower".
 */
export function critKind(params: any[][], n?: number): string {
  return cell(() => {
    const { model } = system(params);
    return criticalPointOf(model, ordinal(n, 'n')).kind;
  });
}

/**
 * Number of critical points between 1 K and 20000 K.
 * @customfunction
 * @helpurl https://localhost:3000/help/CRITCOUNT.html
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
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
 * @helpurl https://localhost:3000/help/PHASEFRAC.html
 * @param x0 Overall mole fraction of B.
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [phase] "high" for the B-rich phase (default) or "low" for the A-rich phase.
 * @returns Mole fraction of the material in that phase, between 0 and 1.
 */
export function phaseFrac(x0: number, T: number, params: any[][], phase?: string): number {
  return cell(() => {
    const x = fraction(x0, 'x0');
    const side = phaseSide(phase);
    const sys = system(params);
    const f = phaseFractions(x, equilibriumAt(sys.model, temperatureIn(sys, T)).gaps);
    return side === 'high' ? f.high : f.low;
  });
}

/**
 * Gap temperature of a composition: the highest temperature (1 K to 20000 K) at which x0 lies on
 * a binodal, i.e. where a homogeneous solution of composition x0 starts to separate on cooling
 * below an upper critical point.
 * @customfunction
 * @helpurl https://localhost:3000/help/TGAP.html
 * @param x0 Overall mole fraction of B.
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @returns Temperature (kelvin, or the card's temperature unit).
 */
export function tGap(x0: number, params: any[][]): number {
  return cell(() => {
    const x = fraction(x0, 'x0');
    const sys = system(params);
    return temperatureOut(sys, gapTemperature(sys.model, x, criticalPointsOf(sys.model)));
  });
}

/**
 * Molar Gibbs energy of mixing g(x, T) relative to the pure components (Flory–Huggins: per mole
 * of lattice sites).
 * @customfunction
 * @helpurl https://localhost:3000/help/GMIX.html
 * @param x Mole fraction of B.
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @returns Gibbs energy of mixing (J/mol, or the card's energy unit; Flory–Huggins: per mole of sites).
 */
export function gMix(x: number, T: number, params: any[][]): number {
  return cell(() => {
    const xB = fraction(x);
    const sys = system(params);
    return energyOut(sys, sys.model.at(temperatureIn(sys, T)).g(xB, 1 - xB));
  });
}

/**
 * A chart-ready table of one gap between two temperatures: columns T (in the card's temperature
 * unit, kelvin without a card), binodal low, binodal high, spinodal low, spinodal high (mole
 * fractions of B); one row per temperature, evenly spaced from T1 to T2. A critical temperature
 * between T1 and T2 replaces the nearest row other than the first and last (T1 and T2 always
 * stay), with the critical composition in all four columns, so the dome closes. Where the gap does
 * not exist, #N/A.
 * @customfunction
 * @helpurl https://localhost:3000/help/GAPTABLE.html
 * @param T1 First temperature (kelvin, or the card's temperature unit).
 * @param T2 Last temperature (kelvin, or the card's temperature unit).
 * @param rows Number of rows (2 to 10000); write it as a number in the formula.
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [gap] Which gap, numbered from low x at each temperature (default 1).
 * @returns rows x 5 table: T (card's temperature unit), binodal low, binodal high, spinodal low, spinodal high.
 */
export function gapTable(T1: number, T2: number, rows: number, params: any[][], gap?: number): any[][] {
  return cell(() => {
    const sys = system(params);
    const from = temperatureIn(sys, T1, 'T1'), to = temperatureIn(sys, T2, 'T2');
    const n = number(rows, 'rows');
    if (!(Number.isInteger(n) && n >= GAPTABLE_ROWS.min && n <= GAPTABLE_ROWS.max)) {
      throw new CellFailure('#NUM!', `rows = ${n}: give a whole number of rows from ${GAPTABLE_ROWS.min} to ${GAPTABLE_ROWS.max}`);
    }
    const which = ordinal(gap, 'gap');
    const { model } = sys;
    const missing = new CellFailure('#N/A', `gap ${which} does not exist at this temperature`);
    const value = (v: number) => cellOf(Number.isNaN(v) ? missing : v);
    // The grid in the user's unit, converted row by row, so that its temperatures come back as typed.
    const grid = evenTemperatures(number(T1, 'T1'), number(T2, 'T2'), n);
    const kelvins = grid.map((t, i) => (i === 0 ? from : i === n - 1 ? to : temperatureIn(sys, t)));
    return coreGapTable(model, kelvins, which, criticalPointsOf(model), crossingsOf(model)).map((r, i) => [
      r.critical ? temperatureOut(sys, r.T) : grid[i], value(r.low), value(r.high), value(r.spinLow), value(r.spinHigh),
    ]);
  });
}

/**
 * Activity of a component at composition x and temperature T: a_i = exp(Mu_i / (R T)), Mu_i its
 * chemical potential per mole of molecules, relative to the pure component in the same structure.
 * Flory–Huggins: per molecule of N_i lattice sites (a 1000-mer at phi = 0.1, chi = 0.55 has
 * a = exp(-455.9)). Below 2.2e-308 an activity is #NUM!: CHEMPOT gives its logarithm, RT ln a.
 * @customfunction
 * @helpurl https://localhost:3000/help/ACTIVITY.html
 * @param x Mole fraction of B (Flory–Huggins: volume fraction of B).
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [of] "A" or "B" (or the card's component names); default "B".
 * @returns Activity (dimensionless), per molecule of the component.
 */
export function activity(x: number, T: number, params: any[][], of?: string): number {
  return cell(() => {
    const { sys, xB, TK, which } = pointArgs(x, T, params, of);
    const a = activities(sys.model, TK, xB);
    return expOfLog(which === 'A' ? a.lnA : a.lnB, `the activity of ${sys.names[which]}`, 'CHEMPOT gives its logarithm as RT ln a');
  });
}

/**
 * Activity coefficient of a component: gamma_i = a_i / x_i, with a_i per mole of molecules as in
 * ACTIVITY (Flory–Huggins: gamma_i = a_i / phi_i, on the volume-fraction basis).
 * @customfunction
 * @helpurl https://localhost:3000/help/ACTCOEF.html
 * @param x Mole fraction of B (Flory–Huggins: volume fraction of B).
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [of] "A" or "B" (or the card's component names); default "B".
 * @returns Activity coefficient (dimensionless).
 */
export function actCoef(x: number, T: number, params: any[][], of?: string): number {
  return cell(() => {
    const { sys, xB, TK, which } = pointArgs(x, T, params, of);
    const a = activities(sys.model, TK, xB);
    return expOfLog(which === 'A' ? a.lnGammaA : a.lnGammaB, `the activity coefficient of ${sys.names[which]}`, 'CHEMPOT gives RT ln a, and ln gamma = ln a - ln x');
  });
}

/**
 * Chemical potential of a component relative to the pure component, per mole of its molecules:
 * mu_A = g - x g', mu_B = g + (1 - x) g'. Flory–Huggins, where g is per mole of lattice sites:
 * N_A (g - phi g') and N_B (g + (1 - phi) g'), per mole of chains. Equals R T ln a, also where the
 * activity itself is too small for a number.
 * @customfunction
 * @helpurl https://localhost:3000/help/CHEMPOT.html
 * @param x Mole fraction of B (Flory–Huggins: volume fraction of B).
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @param [of] "A" or "B" (or the card's component names); default "B".
 * @returns Chemical potential (J per mole of molecules of the component, or the card's energy unit).
 */
export function chemPot(x: number, T: number, params: any[][], of?: string): number {
  return cell(() => {
    const { sys, xB, TK, which } = pointArgs(x, T, params, of);
    const a = activities(sys.model, TK, xB);
    return energyOut(sys, which === 'A' ? a.muA : a.muB);
  });
}

/**
 * Excess Gibbs energy: g minus the ideal mixing term RT[x ln x + (1-x) ln(1-x)] (Flory–Huggins:
 * in the volume fraction, per mole of lattice sites).
 * @customfunction
 * @helpurl https://localhost:3000/help/GEXCESS.html
 * @param x Mole fraction of B.
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @returns Excess Gibbs energy (J/mol, or the card's energy unit; Flory–Huggins: per mole of sites).
 */
export function gExcess(x: number, T: number, params: any[][]): number {
  return cell(() => {
    const { sys, xB, TK } = pointArgs(x, T, params);
    return energyOut(sys, excessGibbs(sys.model.at(TK), xB));
  });
}

/**
 * Driving force for a new phase to form from a homogeneous solution x0 (parallel tangent):
 * the largest height of the tangent at x0 above g, per mole of the new phase (Flory–Huggins: per
 * mole of its lattice sites). 0 when no new phase can lower the energy.
 * @customfunction
 * @helpurl https://localhost:3000/help/DRIVEFORCE.html
 * @param x0 Overall mole fraction of B of the homogeneous solution.
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @returns Driving force (J/mol, or the card's energy unit; Flory–Huggins: per mole of sites), >= 0.
 */
export function driveForce(x0: number, T: number, params: any[][]): number {
  return cell(() => {
    const { sys, xB, TK } = pointArgs(x0, T, params, undefined, 'x0');
    return energyOut(sys, drivingForce(sys.model.at(TK), equilibriumAt(sys.model, TK), xB));
  });
}

/**
 * Decomposition gain: how far g of a homogeneous solution x0 lies above the lower convex
 * envelope (the energy released by splitting into the two coexisting phases), per mole (Flory–Huggins:
 * per mole of lattice sites). 0 outside every gap.
 * @customfunction
 * @helpurl https://localhost:3000/help/DECOMPGAIN.html
 * @param x0 Overall mole fraction of B.
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @returns Decomposition gain (J/mol, or the card's energy unit; Flory–Huggins: per mole of sites), >= 0.
 */
export function decompGain(x0: number, T: number, params: any[][]): number {
  return cell(() => {
    const { sys, xB, TK } = pointArgs(x0, T, params, undefined, 'x0');
    return energyOut(sys, decompositionGain(sys.model.at(TK), equilibriumAt(sys.model, TK), xB));
  });
}

/**
 * Reads a parameter card (or number, or range) and says in one line what it describes: model,
 * parameters as read, units, and its highest critical point, so a mistyped card shows at once.
 * @customfunction
 * @helpurl https://localhost:3000/help/CHECKCARD.html
 * @param params Parameter card (key/value range), or Omega in J/mol, or Redlich–Kister rows a, b, c (J/mol, J/(mol K), J/(mol K)).
 * @returns One-line summary.
 */
export function checkCard(params: any[][]): string {
  return cell(() => {
    if (isTernaryCard(params)) return ternarySystem(params).description;
    const sys = system(params);
    const names = sys.names.A !== 'A' || sys.names.B !== 'B' ? `; A = ${sys.names.A}, B = ${sys.names.B}` : '';
    let critical: string;
    try {
      const points = criticalPointsOf(sys.model);
      critical = points.length === 0
        ? `no critical point between ${unitsOf(sys).temperature(T_SEARCH_MIN)} and ${unitsOf(sys).temperature(T_SEARCH_MAX)}`
        : points.map((p) => `${p.kind} critical point ${round(temperatureOut(sys, p.T))} ${sys.temperature.name} at x = ${round(p.x)}`).join(', ');
    } catch (e) {
      critical = `critical points not found: ${asFailure(e, sys).message}`;
    }
    return `${sys.description}${names}; ${critical}`;
  });
}

const round = (v: number) => Number(v.toPrecision(6));

/** Common arguments of the point functions: system, composition, temperature in K, component. */
function pointArgs(x: unknown, T: unknown, params: unknown, of?: unknown, xName = 'x') {
  const sys = system(params);
  const xB = fraction(x, xName);
  const TK = temperatureIn(sys, T);
  return { sys, xB, TK, which: component(of, sys) };
}
