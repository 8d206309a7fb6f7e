/**
 * Parameter cards: a two-column range of keys and values beside the grid that uses it.
 *
 *   model        the name of a model family (src/core/models/index.ts) or one of its aliases
 *   ...          the keys of that family (declared beside its model)
 *   energy       J/mol (default) | kJ/mol | cal/mol | kcal/mol | eV/atom
 *   temperature  K (default) | °C: the unit of every temperature the functions read and return
 *   name A, name B   names of the components, used in messages and summaries
 *
 * Temperatures inside model parameters (b of L_k, chi.B, b_ij) are always in kelvin.
 */
import { MixgapError } from '../core/errors';
import { orList, owns, type CardValues, type ModelFamily } from '../core/family';
import type { BinaryModel } from '../core/model';
import { FAMILIES, familyNamed } from '../core/models';
import { energyUnit, temperatureUnit, type EnergyUnit, type TemperatureUnit } from '../core/units';
import { isEmpty, numberText } from './cells';
import { CellFailure } from './errors';

export interface System {
  model: BinaryModel;
  energy: EnergyUnit;
  temperature: TemperatureUnit;
  names: { A: string; B: string };
  /** What x is: the mole fraction of B, or its volume fraction (Flory–Huggins). */
  composition: ModelFamily['composition'];
  /** The parameters as read, in words, for CHECKCARD. */
  description: string;
}

/** Keys every card may have, whatever its model. */
const COMMON = ['model', 'energy', 'temperature', 'name A', 'name B'];
const ALL_KEYS = [...COMMON, ...FAMILIES.flatMap((f) => f.keys)];
const FAMILY_NAMES = FAMILIES.map((f) => f.name);
const KEY_NOTES = FAMILIES.flatMap((f) => (f.moreKeys ? [f.moreKeys.note] : []));

const bad = (message: string) => new CellFailure('#VALUE!', `parameter card: ${message}`);

/** The key as the card spells it, normalised: spaces collapsed, the case of our own spelling. */
function canonicalKey(raw: string): string {
  const k = raw.trim().replace(/\s+/g, ' ');
  for (const f of FAMILIES) {
    const own = f.moreKeys?.canonical(k);
    if (own !== undefined) return own;
  }
  return ALL_KEYS.find((known) => known.toLowerCase() === k.toLowerCase()) ?? k;
}

/** Whether a cell holds a key some card may have. */
function isKey(v: unknown): boolean {
  if (typeof v !== 'string') return false;
  const key = canonicalKey(v);
  return COMMON.includes(key) || FAMILIES.some((f) => owns(f, key));
}

const isTitle = (key: unknown, value: unknown) =>
  typeof key === 'string' && key.trim().toLowerCase() === 'key' && typeof value === 'string' && value.trim().toLowerCase() === 'value';

/**
 * The key/value pairs of a card range, with where each came from. A card is two columns (key,
 * value); one laid out in two rows (keys in the first, values in the second, `model` among the
 * keys) is read column by column. A title row (or column) `key | value` is skipped.
 */
export function cardEntries(grid: unknown[][], keyTest: (v: unknown) => boolean = isKey): Array<{ key: unknown; value: unknown; rest: unknown[]; where: string }> {
  const filled = grid.filter((row) => !row.every(isEmpty));
  const head = filled[0]?.filter((v, j) => !isEmpty(v) && !(j === 0 && isTitle(v, filled[1]?.[0])));
  const inRows = filled.length === 2 && head.length >= 2 && head.every(keyTest) && head.some((v) => typeof v === 'string' && v.trim().toLowerCase() === 'model');
  let pairs: Array<{ key: unknown; value: unknown; rest: unknown[]; where: string }>;
  if (inRows) {
    const width = Math.max(filled[0].length, filled[1].length);
    pairs = Array.from({ length: width }, (_, j) => ({ key: filled[0][j], value: filled[1][j], rest: [], where: `column ${j + 1}` }));
  } else {
    pairs = grid.map((row, i) => ({ key: row[0], value: row[1], rest: row.slice(2), where: `row ${i + 1}` }));
  }
  pairs = pairs.filter((p) => !(isEmpty(p.key) && isEmpty(p.value) && p.rest.every(isEmpty)));
  if (pairs.length > 0 && isTitle(pairs[0].key, pairs[0].value) && pairs[0].rest.every(isEmpty)) pairs.shift();
  return pairs;
}

/** Whether a range looks like a card: some cell of its first column holds text. */
export function isCard(grid: unknown[][]): boolean {
  return grid.some((row) => typeof row[0] === 'string' && row[0].trim() !== '');
}

/** Reads a card (a range of key/value rows, or of a key row and a value row) into a system. */
/**
 * The values of a card by canonical key, with readers for text and numbers (a number stored as
 * text, as a CSV import leaves it, is the number). Every malformed row is a #VALUE! naming it.
 * `canonical` spells a raw key the reader's way; `keyTest` tells a key cell from a value cell
 * (for cards laid out in two rows).
 */
export function cardValues(grid: unknown[][], canonical: (raw: string) => string, keyTest?: (v: unknown) => boolean): {
  entries: Map<string, unknown>;
  text(key: string): string | undefined;
  num(key: string): number | undefined;
} {
  const entries = new Map<string, unknown>();
  cardEntries(grid, keyTest).forEach(({ key: rawKey, value, rest, where }) => {
    if (rest.some((v) => !isEmpty(v))) throw bad(`${where} has more than two cells: a card has a key column and a value column`);
    if (typeof rawKey !== 'string' || rawKey.trim() === '') throw bad(`${where} has no key in its first cell (found ${JSON.stringify(rawKey ?? '')})`);
    const key = canonical(rawKey);
    if (entries.has(key)) throw bad(`the key "${key}" appears twice: keep one`);
    if (isEmpty(value)) throw bad(`"${key}" has no value: fill the cell beside it or remove the row`);
    entries.set(key, value);
  });
  const text = (key: string): string | undefined => {
    const v = entries.get(key);
    if (v === undefined) return undefined;
    if (typeof v !== 'string') throw bad(`"${key}" must be text (got ${JSON.stringify(v)})`);
    return v.trim();
  };
  const num = (key: string): number | undefined => {
    const v = entries.get(key);
    if (v === undefined) return undefined;
    if (typeof v === 'string' && numberText(v) !== undefined) return numberText(v);
    if (typeof v !== 'number') throw bad(`"${key}" must be a number (got ${JSON.stringify(v)})`);
    if (!Number.isFinite(v)) throw bad(`"${key}" must be a finite number (got ${String(v)})`);
    return v;
  };
  return { entries, text, num };
}

export function readCard(grid: unknown[][]): System {
  const { entries, text, num } = cardValues(grid, canonicalKey);

  const modelText = text('model');
  if (modelText === undefined) throw bad(`no "model" key: add a row model | ${orList(FAMILY_NAMES)}`);
  const family = familyNamed(modelText);
  if (!family) throw bad(`model "${modelText}" is unknown: write ${orList(FAMILY_NAMES)}`);

  for (const key of entries.keys()) {
    if (COMMON.includes(key) || owns(family, key)) continue;
    const owner = FAMILIES.find((f) => owns(f, key));
    if (owner) throw bad(`"${key}" belongs to a ${owner.name} card, not to this ${family.name} card: remove it or change the model`);
    const notes = KEY_NOTES.length > 0 ? ` (${KEY_NOTES.join('; ')})` : '';
    throw bad(`unknown key "${key}": the keys are ${ALL_KEYS.join(', ')}${notes}`);
  }

  const names = { A: text('name A') ?? 'A', B: text('name B') ?? 'B' };
  if (names.A.toLowerCase() === names.B.toLowerCase()) throw bad(`"name A" and "name B" are both "${names.A}": give the components different names`);
  if (names.A.toLowerCase() === 'b' || names.B.toLowerCase() === 'a') throw bad(`a component named "${names.A.toLowerCase() === 'b' ? names.A : names.B}" would be taken for the other component's letter: choose another name`);
  try {
    const energy = energyUnit(text('energy') ?? 'J/mol');
    const temperature = temperatureUnit(text('temperature') ?? 'K');
    const values: CardValues = { num, keys: [...entries.keys()], energy };
    const { model, description } = family.fromCard(values);
    const composition = family.composition === 'mole fraction' ? '' : `; composition = ${family.composition} of ${names.B}`;
    return {
      model, energy, temperature, names, composition: family.composition,
      description: `${description}${composition}; ${unitNote(energy, temperature)}`,
    };
  } catch (e) {
    if (e instanceof MixgapError) throw bad(e.message);
    throw e;
  }
}

/** The units part of a CHECKCARD line. */
export function unitNote(energy: EnergyUnit, temperature: TemperatureUnit): string {
  return `energies in ${energy.name}, temperatures in ${temperature.name}`;
}
