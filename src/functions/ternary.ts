/**
 * Three-component cell functions (ternary conventions: components A, B, C; mole fractions, volume
 * fractions for Flory–Huggins). Each reads its arguments (a ternary card, ./ternaryCard), calls
 * src/core/ternary and lets `cell` turn core failures into cell errors.
 *
 * A composition is given as two numbers x_B, x_C (x_A = 1 - x_B - x_C), or as a range of two
 * cells (x_B, x_C) or three cells (x_A, x_B, x_C, summing to 1 within 1e-9) in the first argument,
 * with the second left empty.
 */
import { expOfLog } from '../core/activity';
import { molarMass as formulaMass } from '../core/composition';
import { fail, MixgapError } from '../core/errors';
import { binodalTable } from '../core/ternary/binodalCurve';
import { LOCAL_SIZE, perMolecule } from '../core/ternary/model';
import { plaitPoints } from '../core/ternary/plait';
import { splitFeed, type TernaryPoint } from '../core/ternary/split';
import { threePhaseTriangles } from '../core/ternary/threePhase';
import { selectivity, tieLineAt } from '../core/ternary/tieLine';
import { asFailure, cell, cellOf, energyOut, number, ordinal, temperatureIn, type System } from './args';
import { gridNumber, isEmpty, numberText, toGrid } from './cells';
import { CellFailure } from './errors';
import { TBINODAL_ROWS } from './shapes';
import { ternarySystem, type TernarySystem } from './ternaryCard';

/** Rows and columns of TSPLIT's table (fixed, so that the formula engine can size it). */
export const TSPLIT_ROWS = 3, TSPLIT_COLS = 4;

/**
 * Number of phases a feed splits into at temperature T: 1, 2 (a tie-line) or 3 (a three-phase
 * triangle).
 * @customfunction
 * @helpurl https://localhost:3000/help/TPHASES.html
 * @param xB Mole fraction of B (Flory–Huggins: volume fraction), or a range of two cells (x_B, x_C) or three cells (x_A, x_B, x_C) with xC left empty.
 * @param xC Mole fraction of C (empty when xB is a range).
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Ternary parameter card (key/value range).
 * @returns 1, 2 or 3.
 */
export function tPhases(xB: any[][], xC: any[][], T: number, params: any[][]): number {
  return tcell(params, (sys) => {
    const { z, TK } = feedArgs(sys, xB, xC, T);
    return splitFeed(sys.model, TK, z.xA, z.xB, z.xC).phases.length;
  });
}

/**
 * The phases a feed splits into at T: a table of 3 rows x 4 columns, one row per phase with x_A,
 * x_B, x_C and its fraction (moles of phase per mole of feed; Flory–Huggins: sites per site),
 * phases by increasing x_C, then x_B. Rows beyond the number of phases are empty ("").
 * @customfunction
 * @helpurl https://localhost:3000/help/TSPLIT.html
 * @param xB Mole fraction of B (Flory–Huggins: volume fraction), or a range of two cells (x_B, x_C) or three cells (x_A, x_B, x_C) with xC left empty.
 * @param xC Mole fraction of C (empty when xB is a range).
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Ternary parameter card (key/value range).
 * @returns 3 x 4 table: x_A, x_B, x_C, fraction per phase; empty rows after the last phase.
 */
export function tSplit(xB: any[][], xC: any[][], T: number, params: any[][]): any[][] {
  return tcell(params, (sys) => {
    const { z, TK } = feedArgs(sys, xB, xC, T);
    const r = splitFeed(sys.model, TK, z.xA, z.xB, z.xC);
    const rows: any[][] = r.phases.map((p, i) => [p.xA, p.xB, p.xC, r.fractions[i]]);
    while (rows.length < TSPLIT_ROWS) rows.push(['', '', '', '']);
    return rows;
  });
}

/**
 * Distribution coefficient of a component between the two phases of the tie-line through a feed:
 * K_i = x_i'' / x_i', x'' the phase richer in C (mole basis; mass basis with molar masses).
 * @customfunction
 * @helpurl https://localhost:3000/help/TDIST.html
 * @param component "A", "B", "C" or the card's component names.
 * @param xB Mole fraction of B, or a range of two cells (x_B, x_C) or three cells (x_A, x_B, x_C) with xC left empty.
 * @param xC Mole fraction of C (empty when xB is a range).
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Ternary parameter card (key/value range).
 * @param [masses] Molar masses of A, B, C for the mass basis (a range of three: numbers in g/mol or formulas such as "H2O"); omitted: mole basis.
 * @returns K_i (dimensionless).
 */
export function tDist(component: string, xB: any[][], xC: any[][], T: number, params: any[][], masses?: any[][]): number {
  return tcell(params, (sys) => {
    const { z, TK } = feedArgs(sys, xB, xC, T);
    const i = ternaryComponent(component, sys, 'component');
    return tieLineAt(sys.model, TK, z.xA, z.xB, z.xC, molarMasses(masses)).K[i];
  });
}

/**
 * Selectivity of component i over component j on the tie-line through a feed: S_ij = K_i / K_j
 * (mole basis; mass basis with molar masses).
 * @customfunction
 * @helpurl https://localhost:3000/help/TSELECT.html
 * @param i "A", "B", "C" or the card's component names.
 * @param j "A", "B", "C" or the card's component names.
 * @param xB Mole fraction of B, or a range of two cells (x_B, x_C) or three cells (x_A, x_B, x_C) with xC left empty.
 * @param xC Mole fraction of C (empty when xB is a range).
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Ternary parameter card (key/value range).
 * @param [masses] Molar masses of A, B, C for the mass basis (a range of three: numbers in g/mol or formulas such as "H2O"); omitted: mole basis.
 * @returns S_ij (dimensionless).
 */
export function tSelect(i: string, j: string, xB: any[][], xC: any[][], T: number, params: any[][], masses?: any[][]): number {
  return tcell(params, (sys) => {
    const { z, TK } = feedArgs(sys, xB, xC, T);
    const a = ternaryComponent(i, sys, 'i'), b = ternaryComponent(j, sys, 'j');
    return selectivity(tieLineAt(sys.model, TK, z.xA, z.xB, z.xC, molarMasses(masses)).K, a, b);
  });
}

/**
 * A plait point at T (where the two phases of a tie-line become one): a row of x_A, x_B, x_C.
 * Several plait points are numbered by increasing x_C, then x_B.
 * @customfunction
 * @helpurl https://localhost:3000/help/TPLAIT.html
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Ternary parameter card (key/value range).
 * @param [n] Which plait point (default 1).
 * @returns 1 x 3 row: x_A, x_B, x_C.
 */
export function tPlait(T: number, params: any[][], n?: number): any[][] {
  return tcell(params, (sys) => {
    const TK = tempIn(sys, T);
    const k = ordinal(n, 'n');
    const points = plaitPoints(sys.model, TK);
    if (points.length < k) fail('none', points.length === 0 ? `no plait point at T = ${T} ${sys.temperature.name}` : `plait point ${k} does not exist at T = ${T} ${sys.temperature.name} (there ${points.length === 1 ? 'is 1' : `are ${points.length}`})`);
    return [row(points[k - 1])];
  });
}

/**
 * The vertices of a three-phase triangle at T: 3 rows (phases by increasing x_C, then x_B) of
 * x_A, x_B, x_C. Triangles are numbered as their first phases.
 * @customfunction
 * @helpurl https://localhost:3000/help/TTRIANGLE.html
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Ternary parameter card (key/value range).
 * @param [n] Which triangle (default 1).
 * @returns 3 x 3 table: x_A, x_B, x_C of each phase.
 */
export function tTriangle(T: number, params: any[][], n?: number): any[][] {
  return tcell(params, (sys) => {
    const TK = tempIn(sys, T);
    const k = ordinal(n, 'n');
    const found = threePhaseTriangles(sys.model, TK);
    if (found.length < k) fail('none', found.length === 0 ? `no three-phase triangle at T = ${T} ${sys.temperature.name}` : `three-phase triangle ${k} does not exist at T = ${T} ${sys.temperature.name} (there ${found.length === 1 ? 'is 1' : `are ${found.length}`})`);
    return found[k - 1].phases.map(row);
  });
}

/**
 * The binodal curve at T as a chart-ready table of tie-lines: rows x 6, each row the two ends of a
 * tie-line (x_A', x_B', x_C', x_A'', x_B'', x_C''), rows evenly spaced along the curve from a
 * binary edge's gap to the plait point (both ends the plait point), another edge or a three-phase
 * triangle's side; one #N/A row between branches and #N/A rows after the last.
 * @customfunction
 * @helpurl https://localhost:3000/help/TBINODAL.html
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Ternary parameter card (key/value range).
 * @param rows Number of rows of the table (3 to 10000); write it as a number in the formula.
 * @returns rows x 6 table: x_A', x_B', x_C', x_A'', x_B'', x_C'' of each tie-line.
 */
export function tBinodal(T: number, params: any[][], rows: number): any[][] {
  return tcell(params, (sys) => {
    const TK = tempIn(sys, T);
    const n = number(rows, 'rows');
    if (!(Number.isInteger(n) && n >= TBINODAL_ROWS.min && n <= TBINODAL_ROWS.max)) {
      throw new CellFailure('#NUM!', `rows = ${n}: give a whole number of rows from ${TBINODAL_ROWS.min} to ${TBINODAL_ROWS.max}`);
    }
    const na = () => cellOf(new CellFailure('#N/A', 'no tie-line in this row (between branches of the binodal curve, or after the last)'));
    return binodalTable(sys.model, TK, n).map((r) => (r ? [...row(r[0]), ...row(r[1])] : [na(), na(), na(), na(), na(), na()]));
  });
}

/**
 * Activity of a component at a ternary composition: a_i = exp(Mu_i / (R T)), Mu_i its chemical
 * potential per mole of molecules relative to the pure component (Flory–Huggins: per molecule of
 * N_i sites). Below 2.2e-308 an activity is #NUM!: TCHEMPOT gives its logarithm, RT ln a.
 * @customfunction
 * @helpurl https://localhost:3000/help/TACTIVITY.html
 * @param component "A", "B", "C" or the card's component names.
 * @param xB Mole fraction of B (Flory–Huggins: volume fraction), or a range of two cells (x_B, x_C) or three cells (x_A, x_B, x_C) with xC left empty.
 * @param xC Mole fraction of C (empty when xB is a range).
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Ternary parameter card (key/value range).
 * @returns Activity (dimensionless), per molecule of the component.
 */
export function tActivity(component: string, xB: any[][], xC: any[][], T: number, params: any[][]): number {
  return tcell(params, (sys) => {
    const { z, TK } = feedArgs(sys, xB, xC, T, 'composition');
    const i = ternaryComponent(component, sys, 'component');
    const iso = sys.model.at(TK);
    perMolecule(sys.model, iso, z.xA, z.xB, z.xC, mu);
    return expOfLog(mu[i] / iso.RT, `the activity of ${namesOf(sys)[i]}`, 'TCHEMPOT gives its logarithm as RT ln a');
  });
}

/**
 * Chemical potential of a component relative to the pure component, per mole of its molecules
 * (Flory–Huggins: N_i times the per-site potential), mu_i = g + sum_j (delta_ij - x_j) dg/dx_j.
 * @customfunction
 * @helpurl https://localhost:3000/help/TCHEMPOT.html
 * @param component "A", "B", "C" or the card's component names.
 * @param xB Mole fraction of B (Flory–Huggins: volume fraction), or a range of two cells (x_B, x_C) or three cells (x_A, x_B, x_C) with xC left empty.
 * @param xC Mole fraction of C (empty when xB is a range).
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Ternary parameter card (key/value range).
 * @returns Chemical potential (J per mole of molecules, or the card's energy unit).
 */
export function tChemPot(component: string, xB: any[][], xC: any[][], T: number, params: any[][]): number {
  return tcell(params, (sys) => {
    const { z, TK } = feedArgs(sys, xB, xC, T, 'composition');
    const i = ternaryComponent(component, sys, 'component');
    perMolecule(sys.model, sys.model.at(TK), z.xA, z.xB, z.xC, mu);
    return energyOut(asUnits(sys), mu[i]);
  });
}

/**
 * Molar Gibbs energy of mixing g at a ternary composition (Flory–Huggins: per mole of lattice
 * sites). Unlike the other functions, a fraction may be 0 here: on an edge g is the binary g of
 * the other two components.
 * @customfunction
 * @helpurl https://localhost:3000/help/TGMIX.html
 * @param xB Mole fraction of B (Flory–Huggins: volume fraction), or a range of two cells (x_B, x_C) or three cells (x_A, x_B, x_C) with xC left empty.
 * @param xC Mole fraction of C (empty when xB is a range).
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Ternary parameter card (key/value range).
 * @returns Gibbs energy of mixing (J/mol, or the card's energy unit; Flory–Huggins: per mole of sites).
 */
export function tGMix(xB: any[][], xC: any[][], T: number, params: any[][]): number {
  return tcell(params, (sys) => {
    const z = composition(xB, xC, 'composition', true);
    return energyOut(asUnits(sys), sys.model.at(tempIn(sys, T)).g(z.xA, z.xB, z.xC));
  });
}

// ---------------------------------------------------------------------------------------------
// Arguments

const mu = new Float64Array(LOCAL_SIZE);

/**
 * `cell` for a ternary function: reads the card, runs the body, and writes the temperatures and
 * energies of core failures in the card's units.
 */
export function tcell<R>(params: unknown, body: (sys: TernarySystem) => R): R {
  return cell(() => {
    const sys = ternarySystem(params);
    try {
      return body(sys);
    } catch (e) {
      throw e instanceof MixgapError ? asFailure(e, asUnits(sys)) : e;
    }
  });
}

const row = (p: TernaryPoint) => [p.xA, p.xB, p.xC];

/** The unit part of a ternary system, as the binary unit helpers read it. */
const asUnits = (sys: TernarySystem) => ({ temperature: sys.temperature, energy: sys.energy }) as unknown as System;

export function tempIn(sys: TernarySystem, value: unknown): number {
  return temperatureIn(asUnits(sys), value);
}

function namesOf(sys: TernarySystem): [string, string, string] {
  return [sys.names.A, sys.names.B, sys.names.C];
}

function feedArgs(sys: TernarySystem, xB: unknown, xC: unknown, T: unknown, what = 'feed') {
  const z = composition(xB, xC, what);
  return { sys, z, TK: tempIn(sys, T) };
}

/**
 * A composition: two numbers (x_B, x_C), or a range of two or three cells in the first argument
 * with the second empty. Outside the triangle (a fraction <= 0, or x_B + x_C >= 1) is #NUM!.
 */
export function composition(xB: unknown, xC: unknown, what = 'feed', edges = false): TernaryPoint {
  const grid = toGrid(xB);
  const cells = grid.flat().filter((v) => !isEmpty(v));
  let z: TernaryPoint;
  if (grid.flat().length > 1) {
    if (!isEmpty(xC) && !(Array.isArray(xC) && toGrid(xC).flat().every(isEmpty))) {
      throw new CellFailure('#VALUE!', `the ${what} is a range in the first argument and xC is given too: leave xC empty, or give x_B and x_C as two numbers`);
    }
    if (cells.length !== 2 && cells.length !== 3) {
      throw new CellFailure('#VALUE!', `the ${what} range holds ${cells.length} numbers: give two (x_B, x_C) or three (x_A, x_B, x_C)`);
    }
    const v = cells.map((c, k) => gridNumber(c, `the ${what} range, cell ${k + 1}`));
    if (v.length === 3) {
      const sum = v[0] + v[1] + v[2];
      if (!(Math.abs(sum - 1) <= 1e-9)) throw new CellFailure('#NUM!', `the ${what} fractions sum to ${sum}, not 1 (within 1e-9): correct them`);
      z = { xA: v[0], xB: v[1], xC: v[2] };
    } else z = { xA: 1 - v[0] - v[1], xB: v[0], xC: v[1] };
  } else {
    if (toGrid(xC).flat().length > 1) throw new CellFailure('#VALUE!', 'xC is a range of several cells: give x_C as one number, or the whole composition as a range in the first argument with xC empty');
    const b = number(cells[0] ?? grid[0][0], 'xB');
    const c = number(Array.isArray(xC) ? toGrid(xC)[0][0] : xC, 'xC');
    z = { xA: 1 - b - c, xB: b, xC: c };
  }
  for (const [name, v] of [['x_A', z.xA], ['x_B', z.xB], ['x_C', z.xC]] as const) {
    const ok = edges ? v >= 0 && v <= 1 : v > 0 && v < 1;
    if (!ok) {
      const where = name === 'x_A' && v <= 0 ? ` (x_B + x_C = ${z.xB + z.xC})` : '';
      throw new CellFailure('#NUM!', `the ${what} lies outside the composition triangle: ${name} = ${v}${where}; every fraction must lie ${edges ? 'between 0 and 1' : 'strictly between 0 and 1 (on an edge, use the binary functions of that pair)'}`);
    }
  }
  return z;
}

/** Which component an argument names: "A", "B", "C" or a card's component name -> 0, 1, 2. */
export function ternaryComponent(value: unknown, sys: TernarySystem, name: string): 0 | 1 | 2 {
  const text = typeof value === 'string' ? value.trim().toLowerCase() : undefined;
  const names = namesOf(sys);
  for (const i of [0, 1, 2] as const) {
    if (text === 'abc'[i] || text === names[i].toLowerCase()) return i;
  }
  const own = names.some((n, i) => n !== 'ABC'[i]) ? ` (or ${names.join(', ')})` : '';
  throw new CellFailure('#VALUE!', `${name} = ${JSON.stringify(value ?? '')} is not a component of this card: write "A", "B" or "C"${own}`);
}

/** Optional molar masses of A, B, C (g/mol). */
function molarMasses(value: unknown): [number, number, number] | undefined {
  const cells = toGrid(value).flat().filter((v) => !isEmpty(v));
  if (cells.length === 0) return undefined;
  if (cells.length !== 3) throw new CellFailure('#VALUE!', `masses holds ${cells.length} values: give the molar masses of A, B and C (three numbers, g/mol), or leave it empty for the mole basis`);
  const M = cells.map((c, k) => {
    if (typeof c === 'string' && numberText(c) === undefined) return formulaMass(c.trim());
    const m = gridNumber(typeof c === 'string' ? numberText(c) : c, `masses, cell ${k + 1}`, 'give a molar mass in g/mol or a formula such as "H2O"');
    if (!(m > 0)) throw new CellFailure('#NUM!', `the molar mass of ${'ABC'[k]} = ${m}: give a positive number of g/mol`);
    return m;
  });
  return M as [number, number, number];
}
