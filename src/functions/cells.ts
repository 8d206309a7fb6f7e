/**
 * The smallest readers of what hosts hand a cell function: empty cells, ranges, numbers inside
 * ranges, numbers typed as text and choice words. Every reader of arguments (./args, ./card,
 * ./fitting) uses these, so that the same bad input gives the same error code everywhere:
 * #VALUE! for a value of the wrong kind (text, TRUE/FALSE, an unknown word), #NUM! for a number
 * out of range (NaN and infinity included).
 */
import { CellFailure } from './errors';

/** A cell value as hosts hand it over: empty cells arrive as null, undefined or ''. */
export type CellValue = number | string | boolean | null | undefined;

/** An empty cell (or an omitted argument). */
export const isEmpty = (v: unknown): v is null | undefined | '' => v === null || v === undefined || v === '';

/** A range argument as rows of cells: a single value is a 1 x 1 range, a flat list one column. */
export function toGrid(value: unknown): CellValue[][] {
  if (!Array.isArray(value)) return [[value as CellValue]];
  return (value as unknown[]).map((row) => (Array.isArray(row) ? (row as CellValue[]) : [row as CellValue]));
}

/** A decimal number as typed (point decimal separator, optional sign and exponent). */
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** The number a text spells ("21000", " -4.2e3 "), or undefined when it spells none. */
export function numberText(text: string): number | undefined {
  const t = text.trim();
  return NUMBER.test(t) ? Number(t) : undefined;
}

/** A number inside a range: #VALUE! for text or TRUE/FALSE, #NUM! for NaN or infinity. */
export function gridNumber(v: unknown, where: string, fix = 'give a number'): number {
  if (typeof v !== 'number') throw new CellFailure('#VALUE!', `${where} holds ${JSON.stringify(v)}: ${fix}`);
  if (!Number.isFinite(v)) throw new CellFailure('#NUM!', `${where} is not a finite number`);
  return v;
}

/**
 * One of a few words (any case, spaces around ignored): `words` maps each word as written to what
 * it means, for the message. An empty cell gives `fallback`; without one it is refused too.
 */
export function choice<W extends string>(value: unknown, name: string, words: Readonly<Record<W, string>>, fallback?: NoInfer<W>): W {
  if (isEmpty(value) && fallback !== undefined) return fallback;
  const text = typeof value === 'string' ? value.trim().toLowerCase() : undefined;
  const found = (Object.keys(words) as W[]).find((w) => w.toLowerCase() === text);
  if (found !== undefined) return found;
  const list = (Object.keys(words) as W[]).map((w) => `"${w}"${words[w] ? ` (${words[w]})` : ''}`);
  const said = list.length <= 1 ? list.join('') : `${list.slice(0, -1).join(', ')} or ${list[list.length - 1]}`;
  throw new CellFailure('#VALUE!', `${name} = ${JSON.stringify(value ?? '')}: write ${said}`);
}
