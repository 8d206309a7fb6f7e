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
 *
 *   u(NAME)        standard uncertainty of parameter NAME, in the unit of NAME's value on the card
 *   r(NAME1, NAME2) correlation coefficient of two parameters that both have a u() (0 when not given)
 * (notation of the guide to uncertainty in measurement, JCGM 100:2008). A card without u() is an
 * ordinary card; with them, its System carries the parameters' covariance in SI units.
 */
import { movedFrom } from '../core/equilibrium';
import { UNCERTAINTY_STEP } from '../core/fit/propagation';
import { MixgapError } from '../core/errors';
import { buildModel } from '../core/fit/parameters';
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
  /** The parameters' values and covariance, when the card carries u() rows. */
  uncertainty?: CardUncertainty;
}

/** What a card with u() (and r()) rows says about its parameters, in SI units. */
export interface CardUncertainty {
  family: ModelFamily;
  /** Every parameter the card gives (its model's keys), in SI units (J/mol, K). */
  values: Record<string, number>;
  /** The parameters with a u(), in the card's order: the rows and columns of `covariance`. */
  names: string[];
  /** C_ij = u_i u_j r_ij, SI units. */
  covariance: number[][];
  /** SI units per card unit of each parameter (the card's energy unit for energies, else 1). */
  scale: Record<string, number>;
}

/** Keys every card may have, whatever its model. */
const COMMON = ['model', 'energy', 'temperature', 'name A', 'name B'];
const ALL_KEYS = [...COMMON, ...FAMILIES.flatMap((f) => f.keys)];
const FAMILY_NAMES = FAMILIES.map((f) => f.name);
const KEY_NOTES = FAMILIES.flatMap((f) => (f.moreKeys ? [f.moreKeys.note] : []));

const bad = (message: string) => new CellFailure('#VALUE!', `parameter card: ${message}`);

/** `u(NAME)` and `r(NAME1, NAME2)`, any case, spaces free inside the parentheses. */
const U_KEY = /^u\s*\(\s*([^(),]+?)\s*\)$/i;
const R_KEY = /^r\s*\(\s*([^(),]+?)\s*,\s*([^(),]+?)\s*\)$/i;

/** The key as the card spells it, normalised: spaces collapsed, the case of our own spelling. */
function canonicalKey(raw: string): string {
  const k = raw.trim().replace(/\s+/g, ' ');
  const u = U_KEY.exec(k);
  if (u) return `u(${canonicalKey(u[1])})`;
  const r = R_KEY.exec(k);
  if (r) return `r(${canonicalKey(r[1])}, ${canonicalKey(r[2])})`;
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
  return COMMON.includes(key) || FAMILIES.some((f) => owns(f, key)) || U_KEY.test(key) || R_KEY.test(key);
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
    if (COMMON.includes(key) || owns(family, key) || U_KEY.test(key) || R_KEY.test(key)) continue;
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
    const uncertainty = readUncertainty(family, [...entries.keys()], num, energy);
    const system: System = {
      model, energy, temperature, names, composition: family.composition,
      description: `${description}${composition}; ${unitNote(energy, temperature)}${uncertainty ? `; ${uncertaintyNote(uncertainty, num)}` : ''}`,
    };
    if (uncertainty) system.uncertainty = uncertainty;
    return system;
  } catch (e) {
    if (e instanceof MixgapError) throw bad(e.message);
    throw e;
  }
}

/** The units part of a CHECKCARD line. */
export function unitNote(energy: EnergyUnit, temperature: TemperatureUnit): string {
  return `energies in ${energy.name}, temperatures in ${temperature.name}`;
}

/**
 * SI units per card unit of a parameter: the card's energy unit for the energies of the regular
 * and Redlich–Kister cards (omega, L_k, L_k.b, L_k.c: their families multiply them by it), 1 for
 * every other parameter (chi, chain lengths, taus' a_ij, alpha are numbers; b_ij, chi.B kelvin).
 */
function siScale(key: string, energy: EnergyUnit): number {
  return /^(omega|L\d+(\.[bc])?)$/.test(key) ? energy.toJoulePerMole : 1;
}

/**
 * The u() and r() rows of a card, checked: u() of a parameter the card gives, a finite number
 * >= 0; r() of two parameters with u(), in [-1, 1], each pair once; together positive semidefinite.
 * Undefined when the card has no u() row (and then no r() row may be there either).
 */
function readUncertainty(family: ModelFamily, keys: string[], num: (key: string) => number | undefined, energy: EnergyUnit): CardUncertainty | undefined {
  const uKeys = keys.filter((k) => U_KEY.test(k));
  const rKeys = keys.filter((k) => R_KEY.test(k));
  if (uKeys.length === 0 && rKeys.length === 0) return undefined;
  const given = keys.filter((k) => owns(family, k));
  const names: string[] = [];
  const u: number[] = [];
  for (const key of uKeys) {
    const name = U_KEY.exec(key)![1];
    if (!owns(family, name)) throw bad(`"${key}": ${name} is not a parameter of a ${family.name} card (its parameters: ${given.join(', ')})`);
    if (!given.includes(name)) throw bad(`"${key}": the card gives no value for ${name}: add a row ${name} | value or remove ${key}`);
    const v = num(key)!;
    if (!(v >= 0)) throw bad(`"${key}" = ${v}: a standard uncertainty is a number >= 0`);
    names.push(name);
    u.push(v * siScale(name, energy));
  }
  const r: number[][] = names.map((_, i) => names.map((__, j) => (i === j ? 1 : 0)));
  const seen = new Set<string>();
  for (const key of rKeys) {
    const [, a, b] = R_KEY.exec(key)!;
    if (a === b) throw bad(`"${key}": a parameter's correlation with itself is 1 by definition: remove the row`);
    for (const n of [a, b]) {
      if (!names.includes(n)) throw bad(`"${key}": ${n} has no u() row: a correlation needs the standard uncertainties of both parameters (add u(${n}))`);
    }
    const pair = [a, b].sort().join('\u0000');
    if (seen.has(pair)) throw bad(`"${key}": the correlation of ${a} and ${b} is given twice (in either order): keep one`);
    seen.add(pair);
    const v = num(key)!;
    if (!(v >= -1 && v <= 1)) throw bad(`"${key}" = ${v}: a correlation coefficient lies between -1 and 1`);
    const i = names.indexOf(a), j = names.indexOf(b);
    r[i][j] = r[j][i] = v;
  }
  const bad3 = notSemidefinite(r);
  if (bad3) throw bad(`the correlations of ${bad3.map((i) => names[i]).join(', ')} cannot hold together (their matrix is not positive semidefinite): check the r() rows`);
  const values: Record<string, number> = {};
  const scale: Record<string, number> = {};
  for (const k of given) {
    scale[k] = siScale(k, energy);
    values[k] = num(k)! * scale[k];
  }
  const covariance = names.map((_, i) => names.map((__, j) => u[i] * u[j] * r[i][j]));
  return { family, values, names, covariance, scale };
}

/**
 * Tolerance of the semidefinite test on a correlation matrix: correlations are typed with a few
 * digits, so a matrix whose smallest pivot is below zero by less than this is taken as singular
 * (common practice, no published source).
 */
const PSD_TOLERANCE = 1e-9;

/**
 * Cholesky factorisation of a correlation matrix that allows zero pivots (a semidefinite matrix):
 * undefined when it is positive semidefinite, else the indices of the parameters up to the first
 * pivot that fails.
 */
function notSemidefinite(r: number[][]): number[] | undefined {
  const n = r.length;
  const L = r.map(() => new Array<number>(n).fill(0));
  for (let j = 0; j < n; j++) {
    let d = r[j][j];
    for (let k = 0; k < j; k++) d -= L[j][k] * L[j][k];
    if (d < -PSD_TOLERANCE) return Array.from({ length: j + 1 }, (_, i) => i);
    const pivot = d > PSD_TOLERANCE ? Math.sqrt(d) : 0;
    L[j][j] = pivot;
    for (let i = j + 1; i < n; i++) {
      let s = r[i][j];
      for (let k = 0; k < j; k++) s -= L[i][k] * L[j][k];
      if (pivot === 0) {
        if (Math.abs(s) > PSD_TOLERANCE) return Array.from({ length: i + 1 }, (_, m) => m);
      } else {
        L[i][j] = s / pivot;
      }
    }
  }
  return undefined;
}

/** The uncertainty part of a CHECKCARD line: u() and r() as the card gives them. */
function uncertaintyNote(c: CardUncertainty, num: (key: string) => number | undefined): string {
  const us = c.names.map((n) => `u(${n}) = ${num(`u(${n})`)}`);
  const rs: string[] = [];
  c.names.forEach((a, i) => c.names.forEach((b, j) => {
    if (j <= i) return;
    const v = c.covariance[i][j];
    if (v !== 0) rs.push(`r(${a}, ${b}) = ${Number((v / Math.sqrt(c.covariance[i][i] * c.covariance[j][j])).toPrecision(6))}`);
  }));
  return `standard uncertainties ${us.join(', ')}${rs.length > 0 ? `, correlations ${rs.join(', ')}` : ''}`;
}

/**
 * A card's System with its parameters moved (UNCERTAINTY's evaluations): passed where a card goes,
 * `system()` (./args.ts) takes it as read, so that no card is written and read again.
 */
export class MovedSystem {
  constructor(readonly system: System) {}
}

/** How many moved systems are kept per card (a UNCERTAINTY evaluates 2p + 2 of them). */
const MOVED_KEPT = 16;

/**
 * The moved systems of a card System lately used, least recently used first: the card's parameter
 * names (`CardUncertainty.values`, in its order) and, per moved system, their values in that order.
 */
interface MovedKept {
  keys: string[];
  /** The card's System without its uncertainties: what every moved system shares. */
  rest: Omit<System, 'uncertainty'>;
  list: Array<{ values: number[]; moved: MovedSystem }>;
}
const movedOf = new WeakMap<System, MovedKept>();

/** The kept moved system of these values (card order), moved to the end of the list; if any. */
function keptMove(list: MovedKept['list'], v: readonly number[]): MovedSystem | undefined {
  for (let i = list.length - 1; i >= 0; i--) {
    const e = list[i].values;
    let j = 0;
    while (j < v.length && Object.is(e[j], v[j])) j++;
    if (j < v.length) continue;
    const found = list[i];
    if (i < list.length - 1) list.push(list.splice(i, 1)[0]); // now the most recently used
    return found.moved;
  }
  return undefined;
}

/**
 * Whether `values` move the card's parameters by no more than a central difference's step
 * (UNCERTAINTY_STEP of a standard uncertainty, core/fit/propagation.ts; twice that, for rounding)
 * and leave every parameter without an uncertainty as it is.
 */
function isStep(c: CardUncertainty, values: Readonly<Record<string, number>>): boolean {
  for (const key in values) {
    const j = c.names.indexOf(key), d = Math.abs(values[key] - c.values[key]);
    if (j < 0 ? d !== 0 : !(d <= 2 * UNCERTAINTY_STEP * Math.sqrt(c.covariance[j][j]))) return false;
  }
  return true;
}

/**
 * The System of `sys` with other parameter values (SI units, as in `sys.uncertainty.values`; the
 * others kept), built by the family's own card reader (core/fit/parameters.ts buildModel). A bad
 * value is the family's MixgapError ('input'). The last few are kept per card, so that a column of
 * UNCERTAINTY cells over one card builds the models of its central differences once; each model is
 * marked as a move of the card's (core/equilibrium.ts movedFrom), so that its solves start from
 * the card's own.
 */
export function moved(sys: System, values: Readonly<Record<string, number>>): MovedSystem {
  const c = sys.uncertainty;
  if (!c) throw new CellFailure('#VALUE!', 'the card carries no uncertainties');
  let kept = movedOf.get(sys);
  if (!kept) {
    const { uncertainty: _, ...rest } = sys;
    movedOf.set(sys, (kept = { keys: Object.keys(c.values), rest, list: [] }));
  }
  // kept by value only when `values` names every parameter of the card and no other
  const whole = Object.keys(values).length === kept.keys.length && kept.keys.every((k) => k in values);
  const v = whole ? kept.keys.map((k) => values[k]) : [];
  let m = whole ? keptMove(kept.list, v) : undefined;
  if (!m) {
    m = new MovedSystem({ ...kept.rest, model: buildModel(c.family, whole ? values : { ...c.values, ...values }) });
    if (whole) {
      if (kept.list.length >= MOVED_KEPT) kept.list.shift();
      kept.list.push({ values: v, moved: m });
    }
  }
  movedFrom(m.system.model, sys.model, isStep(c, values));
  return m;
}
