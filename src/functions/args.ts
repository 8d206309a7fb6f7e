/**
 * Reading cell arguments: every check on what a user typed lives here, with a message that says
 * what to fix. Nothing numerical happens in this file.
 */
import { BoundedCache } from '../core/boundedCache';
import { formatNumber, MixgapError, type UnitWriter } from '../core/errors';
import { describeRedlichKister, describeRegular, redlichKister, type RedlichKisterTerm } from '../core/models/redlichKister';
import { JOULE_PER_MOLE, KELVIN } from '../core/units';
import { isCard, MovedSystem, readCard, unitNote, type System } from './card';
import { choice, gridNumber, isEmpty, numberText, toGrid, type CellValue } from './cells';
import { CellFailure, toHostError, type Cell } from './errors';

export type { CellValue } from './cells';

/**
 * The system the running cell function read (set by `system`): its units are those in which core
 * failures name temperatures and energies.
 */
let scope: System | undefined;

/**
 * Runs a cell function body: core failures become the cell error that fits, with their message,
 * temperatures and energies in it written in the units of the card the body read.
 */
export function cell<T>(body: () => T): T {
  const outer = scope;
  scope = undefined;
  let result: T;
  try {
    result = body();
  } catch (e) {
    throw toHostError(asFailure(e, scope));
  } finally {
    scope = outer;
  }
  if (typeof result === 'number' && !Number.isFinite(result)) {
    throw toHostError(new CellFailure('#NUM!', 'the result overflows (is not a finite number): the parameters are too large for this quantity'));
  }
  return result;
}

/**
 * The CellFailure that reports any exception; a core failure's temperatures and energies are
 * written in the units of `sys` (kelvin and J/mol without one).
 */
export function asFailure(e: unknown, sys?: System): CellFailure {
  if (e instanceof CellFailure) return e;
  if (e instanceof MixgapError) {
    const code = e.reason === 'none' ? '#N/A' : e.reason === 'input' ? '#VALUE!' : '#NUM!';
    const message = sys ? e.text(unitsOf(sys)) : e.message;
    const text = e.reason === 'convergence' ? `did not converge: ${message}` : message;
    return new CellFailure(code, text);
  }
  return new CellFailure('#VALUE!', `internal error: ${e instanceof Error ? e.message : String(e)}`);
}

/** How a system's card writes quantities: its temperature and energy units. */
export function unitsOf(sys: System): UnitWriter {
  return {
    temperature: (K) => `${formatNumber(temperatureOut(sys, K))} ${sys.temperature.name}`,
    energy: (J) => `${formatNumber(energyOut(sys, J))} ${sys.energy.name}`,
  };
}

/** Turns a per-cell failure of a spilled result into what the host shows in that cell. */
export function cellOf(value: Cell): unknown {
  return value instanceof CellFailure ? toHostError(value) : value;
}

/** A required number argument. */
export function number(value: unknown, name: string): number {
  if (typeof value === 'number') {
    if (Number.isNaN(value)) throw new CellFailure('#NUM!', `${name} is not a number (NaN)`);
    if (!Number.isFinite(value)) throw new CellFailure('#NUM!', `${name} must be finite (got ${value})`);
    return value;
  }
  if (isEmpty(value)) throw new CellFailure('#VALUE!', `${name} is empty: give a number`);
  if (typeof value === 'boolean') throw new CellFailure('#VALUE!', `${name} is TRUE/FALSE: give a number`);
  throw new CellFailure('#VALUE!', `${name} is the text "${String(value)}": give a number`);
}

/** A mole fraction strictly between 0 and 1. */
export function fraction(value: unknown, name = 'x'): number {
  const x = number(value, name);
  if (!(x > 0 && x < 1)) throw new CellFailure('#NUM!', `${name} = ${x}: a mole fraction must lie strictly between 0 and 1`);
  return x;
}

/** An optional 1-based ordinal (gap number, critical point number); 1 when omitted. */
export function ordinal(value: unknown, name: string): number {
  if (isEmpty(value)) return 1;
  const n = number(value, name);
  if (!(Number.isInteger(n) && n >= 1)) throw new CellFailure('#NUM!', `${name} = ${n}: give a whole number 1, 2, ...`);
  return n;
}

/** Which phase (or side of a gap) an optional argument names: "low" or "high"; "high" when omitted. */
export function phaseSide(value: unknown): 'low' | 'high' {
  return choice(value, 'phase', { low: 'the A-rich phase', high: 'the B-rich phase' }, 'high');
}

export type { System } from './card';

/**
 * The parameter argument: a parameter card (two columns of keys and values, see ./card), a single
 * number (regular solution, Omega in J/mol) or a numeric range of Redlich–Kister rows (row k = term
 * L_k; columns a [J/mol], b [J/(mol K)], c [J/(mol K)]; missing columns are zero; empty rows after
 * the last term are ignored). Bare numbers and ranges use J/mol and kelvin.
 */
export function system(params: unknown): System {
  if (params instanceof MovedSystem) return (scope = params.system); // UNCERTAINTY's moved parameters (./card.ts)
  return (scope = systems.get(fingerprint(params), () => readSystem(params)));
}

/**
 * Systems already read, by the text of their parameter cells: a column of formulas that all point
 * at one card reads it once. Bounded (256, least recently used first out); a failed reading is not kept.
 */
const systems = new BoundedCache<System>(256);

/** The cells of a parameter argument as one text (type-tagged, so 1 and "1" differ). */
function fingerprint(params: unknown): string {
  const one = (v: unknown) => (typeof v === 'number' ? `n${v}` : typeof v === 'string' ? `s${v}` : typeof v === 'boolean' ? `b${v}` : isEmpty(v) ? '' : `?${String(v)}`);
  if (!Array.isArray(params)) return one(params);
  let text = '';
  for (const row of params as unknown[]) {
    if (Array.isArray(row)) for (const v of row) text += one(v) + '\u0001';
    else text += one(row) + '\u0001';
    text += '\u0002';
  }
  return text;
}

function readSystem(params: unknown): System {
  const grid = toGrid(params);
  refuseText(grid);
  if (isCard(grid)) return readCard(grid);
  const rows = grid.slice();
  while (rows.length > 0 && rows[rows.length - 1].every(isEmpty)) rows.pop();
  if (rows.length === 0) throw new CellFailure('#VALUE!', 'params is empty: give Omega in J/mol, rows of Redlich–Kister a, b, c, or a parameter card');
  const width = Math.max(...rows.map((r) => r.length));
  const terms: RedlichKisterTerm[] = rows.map((row, k) => {
    const filled = row.filter((v) => !isEmpty(v)).length;
    if (filled === 0) throw new CellFailure('#VALUE!', `params row ${k + 1} (term L${k}) is empty: write 0 for a term that is zero`);
    if (row.length > 3 && row.slice(3).some((v) => !isEmpty(v))) {
      throw new CellFailure('#VALUE!', `params has ${width} columns: a Redlich–Kister row has at most 3 (a, b, c of L_k = a + b T + c T ln T)`);
    }
    const [a, b, c] = [0, 1, 2].map((col) => {
      const v = row[col];
      return isEmpty(v) ? 0 : gridNumber(v, `params row ${k + 1}, column ${col + 1}`, 'every parameter must be a number');
    });
    return { a, b, c };
  });
  const model = redlichKister(terms);
  const regular = terms.length === 1 && terms[0].b === 0 && terms[0].c === 0;
  const words = regular ? describeRegular(terms[0].a, JOULE_PER_MOLE.name) : describeRedlichKister(terms, JOULE_PER_MOLE.name);
  const description = `${words}; ${unitNote(JOULE_PER_MOLE, KELVIN)}`;
  return { model, energy: JOULE_PER_MOLE, temperature: KELVIN, names: { A: 'A', B: 'B' }, composition: 'mole fraction', description };
}

/**
 * Text that is not a card: a single text (the number "21000" typed into a text cell, or a word),
 * a column of texts without values, or Redlich–Kister rows stored as text. Says what to give.
 */
function refuseText(grid: CellValue[][]): void {
  const cells = grid.flatMap((row) => row.filter((v) => !isEmpty(v)));
  const firstColumn = grid.map((row) => row[0]).filter((v) => !isEmpty(v));
  const texts = firstColumn.filter((v): v is string => typeof v === 'string');
  if (texts.length === 0 || texts.some((t) => t.trim().toLowerCase() === 'model')) return;
  const instead = 'give Omega as a number (21000, not "21000"), a range of Redlich–Kister rows a, b, c (numbers), or a parameter card (a two-column range of keys and values, such as model | regular and omega | 21000)';
  const shown = JSON.stringify(texts[0]);
  if (cells.length === firstColumn.length && cells.every((v) => typeof v === 'string')) {
    const stored = numberText(texts[0]) !== undefined ? ' (a number stored as text)' : '';
    throw new CellFailure('#VALUE!', `params is text${stored}: ${shown}${cells.length > 1 ? ` and ${cells.length - 1} more` : ''}; ${instead}`);
  }
  if (firstColumn.every((v) => typeof v === 'number' || (typeof v === 'string' && numberText(v) !== undefined))) {
    throw new CellFailure('#VALUE!', `params holds numbers stored as text (${shown}): make them numbers (a CSV import or a text-formatted cell keeps them as text), or give a parameter card`);
  }
}

/** A temperature argument in the system's unit, returned in kelvin (above 0 K). */
export function temperatureIn(sys: System, value: unknown, name = 'T'): number {
  const t = number(value, name);
  const T = t + sys.temperature.offset;
  if (!(T > 0)) {
    const zero = sys.temperature.name === 'K' ? '0 K' : `${-sys.temperature.offset} °C`;
    throw new CellFailure('#NUM!', `${name} = ${t} ${sys.temperature.name} is not above absolute zero (${zero})`);
  }
  return T;
}

/** A temperature in kelvin, given back in the system's unit. */
export function temperatureOut(sys: System, T: number): number {
  return T - sys.temperature.offset;
}

/** An energy in J/mol, given back in the system's unit. */
export function energyOut(sys: System, J: number): number {
  return J / sys.energy.toJoulePerMole;
}

/** Which component an argument names: "A", "B" or a card's component names; "B" when omitted. */
export function component(value: unknown, sys: System): 'A' | 'B' {
  if (isEmpty(value)) return 'B';
  const text = typeof value === 'string' ? value.trim() : '';
  const lower = text.toLowerCase();
  if (lower === 'a' || lower === sys.names.A.toLowerCase()) return 'A';
  if (lower === 'b' || lower === sys.names.B.toLowerCase()) return 'B';
  const names = sys.names.A !== 'A' ? ` (or ${sys.names.A}, ${sys.names.B})` : '';
  throw new CellFailure('#VALUE!', `component ${JSON.stringify(value)}: write "A" or "B"${names}`);
}
