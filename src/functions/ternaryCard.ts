/**
 * Ternary parameter cards: a binary card (./card) for three components. Same layout (a key column
 * and a value column, or a key row and a value row), same units, same strictness:
 *
 *   model        redlich-kister (rk) | flory-huggins (fh) | nrtl
 *   ...          the keys of that ternary family (src/core/ternary: the binary card's keys behind a
 *                pair prefix AB., AC., BC.; the ternary term behind ABC.; chain lengths NA, NB, NC)
 *   energy       J/mol (default) | kJ/mol | cal/mol | kcal/mol | eV/atom
 *   temperature  K (default) | °C
 *   name A, name B, name C   names of the components, used in messages and component arguments
 *
 * A card is ternary when one of its keys is: a pair-prefixed key, an ABC. key, NC or "name C".
 */
import { BoundedCache } from '../core/boundedCache';
import { MixgapError } from '../core/errors';
import { orList, type CardValues } from '../core/family';
import type { TernaryFamily } from '../core/ternary/family';
import { TERNARY_FAMILIES, ternaryFamilyNamed } from '../core/ternary/families';
import type { TernaryModel } from '../core/ternary/model';
import { energyUnit, temperatureUnit, type EnergyUnit, type TemperatureUnit } from '../core/units';
import { cardValues, unitNote } from './card';
import { toGrid } from './cells';
import { CellFailure } from './errors';

export interface TernarySystem {
  model: TernaryModel;
  energy: EnergyUnit;
  temperature: TemperatureUnit;
  names: { A: string; B: string; C: string };
  composition: TernaryFamily['composition'];
  /** The parameters as read, in one line, for CHECKCARD. */
  description: string;
}

const COMMON = ['model', 'energy', 'temperature', 'name A', 'name B', 'name C'];
const FAMILY_NAMES = TERNARY_FAMILIES.map((f) => f.name);
const bad = (message: string) => new CellFailure('#VALUE!', `parameter card: ${message}`);

/** Our spelling of a raw key: a common key, or the first family's canonical spelling. */
function canonicalKey(raw: string): string {
  const k = raw.trim().replace(/\s+/g, ' ');
  const common = COMMON.find((c) => c.toLowerCase() === k.toLowerCase());
  if (common) return common;
  for (const f of TERNARY_FAMILIES) {
    const own = f.canonical(k);
    if (own !== undefined) return own;
  }
  return k;
}

const owns = (f: TernaryFamily, key: string) => f.canonical(key) === key;
const isKey = (v: unknown) => typeof v === 'string' && (COMMON.includes(canonicalKey(v)) || TERNARY_FAMILIES.some((f) => owns(f, canonicalKey(v))));

/** A key only a ternary card has. */
function ternaryOnly(v: unknown): boolean {
  if (typeof v !== 'string') return false;
  const k = v.trim().replace(/\s+/g, ' ').toLowerCase();
  return k === 'name c' || k === 'nc' || /^(ab|ac|bc|abc)\./.test(k);
}

/** Whether a parameter argument is a ternary card (some cell of it holds a ternary-only key). */
export function isTernaryCard(params: unknown): boolean {
  return toGrid(params).some((row) => row.some(ternaryOnly));
}

/** Reads a ternary card. */
export function readTernaryCard(grid: unknown[][]): TernarySystem {
  if (!grid.some((row) => row.some(ternaryOnly))) {
    throw bad('this is not a ternary card: a three-component function needs a card with the keys of a pair, such as AB.L0 | 12000, AC.L0 | ..., BC.L0 | ... (see the README, "Three components")');
  }
  const { entries, text, num } = cardValues(grid, canonicalKey, isKey);

  const modelText = text('model');
  if (modelText === undefined) throw bad(`no "model" key: add a row model | ${orList(FAMILY_NAMES)}`);
  const family = ternaryFamilyNamed(modelText);
  if (!family) throw bad(`model "${modelText}" is unknown for three components: write ${orList(FAMILY_NAMES)}`);
  for (const key of entries.keys()) {
    if (COMMON.includes(key) || owns(family, key)) continue;
    const owner = TERNARY_FAMILIES.find((f) => owns(f, key));
    if (owner) throw bad(`"${key}" belongs to a ternary ${owner.name} card, not to this ${family.name} card: remove it or change the model`);
    throw bad(`unknown key "${key}": the keys of a ternary ${family.name} card are ${[...COMMON, ...family.keys].join(', ')} (${family.note})`);
  }

  const names = { A: text('name A') ?? 'A', B: text('name B') ?? 'B', C: text('name C') ?? 'C' };
  const letters = ['A', 'B', 'C'] as const;
  for (const i of letters) {
    for (const j of letters) {
      if (i >= j) continue;
      if (names[i].toLowerCase() === names[j].toLowerCase()) throw bad(`"name ${i}" and "name ${j}" are both "${names[i]}": give the components different names`);
    }
    const other = letters.find((l) => l !== i && names[i].toLowerCase() === l.toLowerCase());
    if (other) throw bad(`a component named "${names[i]}" would be taken for component ${other}'s letter: choose another name`);
  }
  try {
    const energy = energyUnit(text('energy') ?? 'J/mol');
    const temperature = temperatureUnit(text('temperature') ?? 'K');
    const values: CardValues = { num, keys: [...entries.keys()], energy };
    const { model, description } = family.fromCard(values);
    const composition = family.composition === 'mole fraction' ? '' : '; compositions are volume fractions';
    const named = names.A !== 'A' || names.B !== 'B' || names.C !== 'C' ? `; A = ${names.A}, B = ${names.B}, C = ${names.C}` : '';
    return {
      model, energy, temperature, names, composition: family.composition,
      description: `${description}${composition}${named}; ${unitNote(energy, temperature)}`,
    };
  } catch (e) {
    if (e instanceof MixgapError) throw bad(e.message);
    throw e;
  }
}

/** Ternary systems already read, by the text of their cells (64, least recently used first out). */
const systems = new BoundedCache<TernarySystem>(64);

/** The ternary system of a parameter argument (read once per distinct card). */
export function ternarySystem(params: unknown): TernarySystem {
  const grid = toGrid(params);
  return systems.get(JSON.stringify(grid), () => readTernaryCard(grid));
}
