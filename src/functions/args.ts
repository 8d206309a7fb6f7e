/**
 * Reading cell arguments: every check on what a user typed lives here, with a message that says
 * what to fix. Nothing numerical happens in this file.
 */
import { MixgapError } from '../core/errors';
import type { BinaryModel } from '../core/model';
import { redlichKister, type RedlichKisterTerm } from '../core/models/redlichKister';
import { CellFailure, toHostError, type Cell } from './errors';

/** A cell value as hosts hand it over: empty cells arrive as null, undefined or ''. */
export type CellValue = number | string | boolean | null | undefined;

const isEmpty = (v: unknown) => v === null || v === undefined || v === '';

/** Runs a cell function body: core failures become the cell error that fits, with their message. */
export function cell<T>(body: () => T): T {
  try {
    return body();
  } catch (e) {
    throw toHostError(asFailure(e));
  }
}

/** The CellFailure that reports any exception. */
export function asFailure(e: unknown): CellFailure {
  if (e instanceof CellFailure) return e;
  if (e instanceof MixgapError) {
    const code = e.reason === 'none' ? '#N/A' : e.reason === 'input' ? '#VALUE!' : '#NUM!';
    const text = e.reason === 'convergence' ? `did not converge: ${e.message}` : e.message;
    return new CellFailure(code, text);
  }
  return new CellFailure('#VALUE!', `internal error: ${e instanceof Error ? e.message : String(e)}`);
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

/** Temperature in kelvin: finite and above 0 K. */
export function kelvin(value: unknown, name = 'T'): number {
  const T = number(value, name);
  if (!(T > 0)) throw new CellFailure('#NUM!', `${name} = ${T} K: the temperature must be above 0 K (in kelvin)`);
  return T;
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

/** The two sides of a gap, as a user names them. */
export function phaseSide(value: unknown): 'low' | 'high' {
  if (isEmpty(value)) return 'high';
  const text = typeof value === 'string' ? value.trim().toLowerCase() : '';
  if (text === 'low' || text === 'high') return text;
  throw new CellFailure('#VALUE!', `phase = ${JSON.stringify(value)}: write "low" (the A-rich phase) or "high" (the B-rich phase)`);
}

/** A system description: for now the model; unit and name settings join it with parameter cards. */
export interface System {
  model: BinaryModel;
}

/**
 * The parameter argument: a single number (regular solution, Omega in J/mol) or a numeric range of
 * Redlich–Kister rows (row k = term L_k; columns a [J/mol], b [J/(mol K)], c [J/(mol K)]; missing
 * columns are zero; empty rows after the last term are ignored).
 */
export function system(params: unknown): System {
  const grid: CellValue[][] = Array.isArray(params)
    ? (params as unknown[]).map((row) => (Array.isArray(row) ? (row as CellValue[]) : [row as CellValue]))
    : [[params as CellValue]];
  const rows = grid.slice();
  while (rows.length > 0 && rows[rows.length - 1].every(isEmpty)) rows.pop();
  if (rows.length === 0) throw new CellFailure('#VALUE!', 'params is empty: give Omega in J/mol, or rows of Redlich–Kister a, b, c');
  const width = Math.max(...rows.map((r) => r.length));
  const terms: RedlichKisterTerm[] = rows.map((row, k) => {
    const filled = row.filter((v) => !isEmpty(v)).length;
    if (filled === 0) throw new CellFailure('#VALUE!', `params row ${k + 1} (term L${k}) is empty: write 0 for a term that is zero`);
    if (row.length > 3 && row.slice(3).some((v) => !isEmpty(v))) {
      throw new CellFailure('#VALUE!', `params has ${width} columns: a Redlich–Kister row has at most 3 (a, b, c of L_k = a + b T + c T ln T)`);
    }
    const [a, b, c] = [0, 1, 2].map((col) => {
      const v = row[col];
      if (isEmpty(v)) return 0;
      if (typeof v !== 'number') {
        throw new CellFailure('#VALUE!', `params row ${k + 1}, column ${col + 1} holds ${JSON.stringify(v)}: every parameter must be a number`);
      }
      if (!Number.isFinite(v)) throw new CellFailure('#NUM!', `params row ${k + 1}, column ${col + 1} is not a finite number`);
      return v;
    });
    return { a, b, c };
  });
  return { model: redlichKister(terms) };
}
