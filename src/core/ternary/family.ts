/**
 * A ternary model family: everything about one three-component model that lies outside its
 * numbers, declared once beside the model (src/core/ternary/<name>.ts) and listed in
 * TERNARY_FAMILIES below, in the spirit of the binary registry (src/core/family.ts).
 *
 * Card keys are the binary card's keys with a pair prefix: `AB.L0` is the L0 of the binary card of
 * the pair A–B (A as its A, B as its B), `AC.alpha` the alpha of the pair A–C, and so on; keys of
 * the whole system carry the prefix `ABC.` (the ternary term) or none (chain lengths NA, NB, NC).
 * Plain data and plain functions only: bad values are `fail('input', ...)`.
 */
import { fail } from '../errors';
import type { CardValues, KeyRow } from '../family';
import type { TernaryModel } from './model';

export interface TernaryFamily {
  /** The name a card's `model` row gives (the same words as the binary family's). */
  readonly name: string;
  readonly aliases: readonly string[];
  /** The keys listed in messages (the first of each open-ended list). */
  readonly keys: readonly string[];
  /** The canonical spelling of any raw key the family owns, undefined for any other key. */
  canonical(raw: string): string | undefined;
  /** Words for messages on the open-ended keys. */
  readonly note: string;
  readonly composition: 'mole fraction' | 'volume fraction';
  readonly keyRows: readonly KeyRow[];
  /** The model a card describes, and its parameters in one line for CHECKCARD. */
  fromCard(card: CardValues): { model: TernaryModel; description: string };
}

/** The three pairs, in the order of the ternary conventions; an edge (i, j) has i as its A. */
export const PAIRS = ['AB', 'AC', 'BC'] as const;
export type Pair = (typeof PAIRS)[number];

/** A raw key split into its pair prefix (any case) and the rest, or undefined. */
export function pairKey(raw: string): { pair: Pair; rest: string } | undefined {
  const m = /^(ab|ac|bc)\.(.+)$/i.exec(raw.trim());
  return m ? { pair: m[1].toUpperCase() as Pair, rest: m[2] } : undefined;
}

/** Fails naming both keys when two keys that say the same thing are both given. */
export function refuseBoth(card: CardValues, one: readonly string[], other: readonly string[], why: string): void {
  const a = one.find((k) => card.keys.includes(k)), b = other.find((k) => card.keys.includes(k));
  if (a !== undefined && b !== undefined) fail('input', `"${a}" and "${b}" contradict each other (${why}): keep one`);
}
