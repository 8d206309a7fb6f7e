/**
 * Every ternary model family a parameter card can name (a card is ternary when it has ternary
 * keys: pair-prefixed keys, NC or "name C"). A new ternary model is its file in this folder (the
 * model and its `TernaryFamily`), one line here, and its tests.
 */
import type { TernaryFamily } from './family';
import { ternaryFloryHugginsFamily } from './floryHuggins';
import { ternaryNrtlFamily } from './nrtl';
import { ternaryRedlichKisterFamily } from './redlichKister';

export const TERNARY_FAMILIES: readonly TernaryFamily[] = [ternaryRedlichKisterFamily, ternaryFloryHugginsFamily, ternaryNrtlFamily];

/** The ternary family a card's `model` value names (its name or an alias, any case), if any. */
export function ternaryFamilyNamed(text: string): TernaryFamily | undefined {
  const t = text.trim().toLowerCase();
  return TERNARY_FAMILIES.find((f) => f.name === t || f.aliases.includes(t));
}
