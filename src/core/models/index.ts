/**
 * Every model family a parameter card can name, in the order messages and tables list them.
 * A new binary model is its file in this folder (the model and its `ModelFamily`), one line here,
 * and its tests.
 */
import type { ModelFamily } from '../family';
import { floryHugginsFamily } from './floryHuggins';
import { nrtlFamily } from './nrtl';
import { redlichKisterFamily, regularFamily } from './redlichKister';

export const FAMILIES: readonly ModelFamily[] = [regularFamily, redlichKisterFamily, floryHugginsFamily, nrtlFamily];

/** The family a card's `model` value names (its name or an alias, any case), if any. */
export function familyNamed(text: string): ModelFamily | undefined {
  const t = text.trim().toLowerCase();
  return FAMILIES.find((f) => f.name === t || f.aliases.includes(t));
}
