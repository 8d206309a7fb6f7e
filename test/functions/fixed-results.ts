/**
 * A fixed set of formulas over the README's invented example systems (regular, Redlich–Kister,
 * Flory–Huggins, NRTL), and what each gives, bit for bit: a number as the hex of its float64
 * bits, an error as its code only (messages are reworded elsewhere). Shared by the test that
 * compares today's results with the record (fixed-results.test.ts) and by the command that
 * rewrites the record (`npm run fixed-results`).
 *
 * The record is of our own code, not a truth: it pins results so that a refactoring that should
 * not change a number is seen to change none, and one that changes last digits on purpose says how
 * many and by how many ulp (in the commit that rewrites the record).
 */
import { forgetSolves } from '../../src/core/equilibrium';
import * as fns from '../../src/functions/functions';
import { CellFailure } from '../../src/functions/errors';

type Value = string | number | boolean | null;
type Card = Value[][] | number;

/** The README's invented systems ("Parameter cards" and "Functions" sections). */
const REGULAR: Card = 21000;
const RK2: Card = [[18000, 0, 0], [4000, 0, 0]];
const RK_TWO_GAPS: Card = [[-5000], [0], [60000]];
const ALLOY: Card = [['model', 'redlich-kister'], ['L0', 21.5], ['L0.b', -0.0042], ['L1', 3.1], ['energy', 'kJ/mol'], ['temperature', '°C'], ['name A', 'avarite'], ['name B', 'bexium']];
const BLEND: Card = [['model', 'flory-huggins'], ['NA', 1200], ['NB', 900], ['chi.A', -0.0011], ['chi.B', 1.32]];
const DECANTER: Card = [['model', 'nrtl'], ['a12', -1.2], ['b12', 1150], ['a21', 0.8], ['b21', 520], ['alpha', 0.25], ['name A', 'water'], ['name B', 'extractant']];

/** One formula: the cell function (export name) and its arguments. */
export interface Formula {
  fn: keyof typeof fns;
  args: unknown[];
}

const text = (v: unknown): string => {
  if (typeof v === 'string') return `"${v}"`;
  if (Array.isArray(v)) return `{${v.map((row: Value[]) => row.map(text).join(',')).join(';')}}`;
  return v === undefined ? '' : String(v);
};

/** The formula as typed into a cell: the key of the record. */
export function formulaText(f: Formula): string {
  return `=MIXGAP.${f.fn.toUpperCase()}(${f.args.map(text).join(', ')})`;
}

function perSystem(card: Card, Ts: number[], xs: number[], table: [number, number, number]): Formula[] {
  const out: Formula[] = [
    { fn: 'tCrit', args: [card] }, { fn: 'xCrit', args: [card] }, { fn: 'critCount', args: [card] },
    { fn: 'tCrit', args: [card, 2] }, { fn: 'xCrit', args: [card, 2] },
    { fn: 'gapTable', args: [...table, card] },
  ];
  for (const T of Ts) {
    out.push(
      { fn: 'gapCount', args: [T, card] },
      { fn: 'gapLow', args: [T, card] }, { fn: 'gapHigh', args: [T, card] },
      { fn: 'gapLow', args: [T, card, 2] }, { fn: 'gapHigh', args: [T, card, 2] },
      { fn: 'spinLow', args: [T, card] }, { fn: 'spinHigh', args: [T, card] },
      { fn: 'spinLow', args: [T, card, 2] }, { fn: 'spinHigh', args: [T, card, 2] },
    );
    for (const x of xs) {
      out.push(
        { fn: 'phaseFrac', args: [x, T, card, 'low'] }, { fn: 'phaseFrac', args: [x, T, card] },
        { fn: 'driveForce', args: [x, T, card] }, { fn: 'decompGain', args: [x, T, card] },
      );
    }
  }
  for (const x of xs) out.push({ fn: 'tGap', args: [x, card] });
  return out;
}

/** The fixed set: about 470 formulas. */
export const FORMULAS: Formula[] = [
  ...perSystem(REGULAR, [300, 800, 1200, 1262, 2000], [0.05, 0.3, 0.5, 0.97], [700, 1300, 7]),
  ...perSystem(RK2, [600, 900, 1180], [0.1, 0.3, 0.6], [800, 1250, 6]),
  ...perSystem(RK_TWO_GAPS, [400, 600, 1500], [0.05, 0.3, 0.56, 0.8], [300, 1800, 8]),
  ...perSystem(ALLOY, [500, 700, 813], [0.25, 0.5], [400, 900, 6]),
  ...perSystem(BLEND, [380, 400, 434.9], [0.3, 0.535898, 0.7], [350, 450, 6]),
  ...perSystem(DECANTER, [293.15, 313.15, 360], [0.02, 0.2, 0.9], [280, 420, 8]),
  // dilute ends and bad input (codes only)
  { fn: 'gapLow', args: [300, 60000] }, { fn: 'gapHigh', args: [300, 60000] },
  { fn: 'gapLow', args: [800, 1e12] }, { fn: 'gapLow', args: [0, 21000] }, { fn: 'tGap', args: [0.3, 1e6] },
  { fn: 'tGap', args: [0.5, -8000] }, { fn: 'tCrit', args: [1e12] },
];

/** What one cell shows: hex of the float64 bits, a text, or the error code. */
export type Shown = string | Shown[];

const bits = new DataView(new ArrayBuffer(8));
export function hexOf(v: number): string {
  bits.setFloat64(0, v);
  return bits.getBigUint64(0).toString(16).padStart(16, '0');
}

function show(v: unknown): Shown {
  if (v instanceof CellFailure) return v.code;
  if (Array.isArray(v)) return v.map(show);
  if (typeof v === 'number') return hexOf(v);
  return `text:${String(v)}`;
}

/** The formula's result, computed now. With `fresh`, the solve memory is emptied first. */
export function evaluate(f: Formula, fresh = true): Shown {
  if (fresh) forgetSolves();
  try {
    return show((fns[f.fn] as (...a: unknown[]) => unknown)(...f.args));
  } catch (e) {
    if (e instanceof CellFailure) return e.code;
    throw e;
  }
}

/** The whole record, each formula evaluated in a fresh state. */
export function record(): Record<string, Shown> {
  const out: Record<string, Shown> = {};
  for (const f of FORMULAS) out[formulaText(f)] = evaluate(f);
  return out;
}
