/**
 * A model family: everything about one binary model that lies outside its numbers, declared once
 * beside the model (src/core/models/<name>.ts) and listed in src/core/models/index.ts. Parameter
 * cards, CHECKCARD, the help pages, the README's card table and the diagram all read it.
 *
 * Plain data and plain functions only: a family says which card keys it owns, how the values of
 * those keys become its model and how it describes them in one line. Bad values are reported with
 * `fail('input', ...)`; the functions layer turns that into the cell error.
 */
import type { BinaryModel } from './model';

/** The values of a parameter card, as a family reads them (keys in their canonical spelling). */
export interface CardValues {
  /** The number under `key`; undefined when the card has no such row. */
  num(key: string): number | undefined;
  /** Every key the card has. */
  readonly keys: readonly string[];
  /** The card's energy unit: its name and its size in J/mol. */
  readonly energy: { readonly name: string; readonly toJoulePerMole: number };
}

/** One row of the card-key table (README, help pages): the keys as written, and what they mean. */
export interface KeyRow {
  /** e.g. ['L0', 'L1', '...']; '...' stands for "and so on". */
  readonly keys: readonly string[];
  /** Plain text; `_k`, `_ij` are subscripts. */
  readonly meaning: string;
}

export interface ModelFamily {
  /** The name a card's `model` row gives, e.g. 'redlich-kister'. */
  readonly name: string;
  /** Other names accepted for it, e.g. ['rk']. */
  readonly aliases: readonly string[];
  /** The keys of its cards, as listed in messages. */
  readonly keys: readonly string[];
  /**
   * Keys beyond `keys` (an open-ended list, such as L1, L2, ...): the canonical spelling of a raw
   * key it owns (undefined for any other key), and the words that say so in messages.
   */
  readonly moreKeys?: { canonical(raw: string): string | undefined; note: string };
  /** What x is for this model. */
  readonly composition: 'mole fraction' | 'volume fraction';
  /** Its rows of the card-key table. */
  readonly keyRows: readonly KeyRow[];
  /**
   * The model a card describes, and its parameters in words for CHECKCARD (values as the card
   * gives them, in its energy unit).
   */
  fromCard(card: CardValues): { model: BinaryModel; description: string };
}

/** Whether `key` (canonical spelling) belongs to the family. */
export function owns(family: ModelFamily, key: string): boolean {
  return family.keys.includes(key) || family.moreKeys?.canonical(key) === key;
}

/** " + 3 T" or " - 3 T" for a nonzero coefficient, "" for zero or none. */
export function signed(v: number | undefined, symbol: string): string {
  return v ? ` ${v < 0 ? '-' : '+'} ${Math.abs(v)} ${symbol}` : '';
}

/** "a, b, c or d". */
export function orList(words: readonly string[]): string {
  return words.length <= 1 ? words.join('') : `${words.slice(0, -1).join(', ')} or ${words[words.length - 1]}`;
}
