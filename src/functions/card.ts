/**
 * Parameter cards: a two-column range of keys and values beside the grid that uses it.
 *
 *   model        regular | redlich-kister | flory-huggins | nrtl   (rk, fh accepted)
 *   omega        regular: interaction energy                        [energy unit]
 *   L0, L1, ...  redlich-kister: constant part a of term L_k         [energy unit]
 *   L0.b, L0.c   redlich-kister: b and c of L_k = a + b T + c T ln T [energy unit per K]
 *   NA, NB       flory-huggins: chain lengths (lattice sites per molecule, 1 for a solvent)
 *   chi.A, chi.B flory-huggins: chi = chi.A + chi.B / T             [-, K]
 *   a12, b12, a21, b21, alpha
 *                nrtl: tau_ij = a_ij + b_ij / T, G_ij = exp(-alpha tau_ij)   [-, K, -]
 *   energy       J/mol (default) | kJ/mol | cal/mol | kcal/mol | eV/atom
 *   temperature  K (default) | °C: the unit of every temperature the functions read and return
 *   name A, name B   names of the components, used in messages and summaries
 *
 * Temperatures inside model parameters (b of L_k, chi.B, b_ij) are always in kelvin.
 */
import { MixgapError } from '../core/errors';
import type { BinaryModel } from '../core/model';
import { floryHuggins } from '../core/models/floryHuggins';
import { nrtl } from '../core/models/nrtl';
import { redlichKister } from '../core/models/redlichKister';
import { energyUnit, temperatureUnit, type EnergyUnit, type TemperatureUnit } from '../core/units';
import { CellFailure } from './errors';

export interface System {
  model: BinaryModel;
  energy: EnergyUnit;
  temperature: TemperatureUnit;
  names: { A: string; B: string };
  /** The parameters as read, in words, for CHECKCARD. */
  description: string;
}

type Family = 'regular' | 'redlich-kister' | 'flory-huggins' | 'nrtl';

const FAMILIES: Record<string, Family> = {
  regular: 'regular', 'redlich-kister': 'redlich-kister', rk: 'redlich-kister',
  'flory-huggins': 'flory-huggins', fh: 'flory-huggins', nrtl: 'nrtl',
};

const COMMON = ['model', 'energy', 'temperature', 'name A', 'name B'];
const FAMILY_KEYS: Record<Family, (key: string) => boolean> = {
  regular: (k) => k === 'omega',
  'redlich-kister': (k) => /^L\d+(\.[abc])?$/.test(k),
  'flory-huggins': (k) => ['NA', 'NB', 'chi.A', 'chi.B'].includes(k),
  nrtl: (k) => ['a12', 'b12', 'a21', 'b21', 'alpha'].includes(k),
};
const ALL_KEYS = [...COMMON, 'omega', 'L0', 'L0.b', 'L0.c', 'NA', 'NB', 'chi.A', 'chi.B', 'a12', 'b12', 'a21', 'b21', 'alpha'];

const bad = (message: string) => new CellFailure('#VALUE!', `parameter card: ${message}`);

/** The key as the card spells it, normalised: spaces collapsed, the case of our own spelling. */
function canonicalKey(raw: string): string {
  const k = raw.trim().replace(/\s+/g, ' ');
  const rk = /^l(\d+)(?:\.([abc]))?$/i.exec(k);
  if (rk) return rk[2] && rk[2].toLowerCase() !== 'a' ? `L${Number(rk[1])}.${rk[2].toLowerCase()}` : `L${Number(rk[1])}`;
  return ALL_KEYS.find((known) => known.toLowerCase() === k.toLowerCase()) ?? k;
}

/** Whether a range looks like a card: some cell of its first column holds text. */
export function isCard(grid: unknown[][]): boolean {
  return grid.some((row) => typeof row[0] === 'string' && row[0].trim() !== '');
}

const isEmpty = (v: unknown) => v === null || v === undefined || v === '';

/** Reads a card (a range of key/value rows) into a system. */
export function readCard(grid: unknown[][]): System {
  const entries = new Map<string, unknown>();
  grid.forEach((row, i) => {
    if (row.every(isEmpty)) return;
    if (row.slice(2).some((v) => !isEmpty(v))) throw bad(`row ${i + 1} has more than two cells: a card has a key column and a value column`);
    const [rawKey, value] = row;
    if (typeof rawKey !== 'string' || rawKey.trim() === '') throw bad(`row ${i + 1} has no key in its first cell (found ${JSON.stringify(rawKey ?? '')})`);
    const key = canonicalKey(rawKey);
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
    if (typeof v !== 'number') throw bad(`"${key}" must be a number (got ${JSON.stringify(v)})`);
    if (!Number.isFinite(v)) throw bad(`"${key}" must be a finite number (got ${String(v)})`);
    return v;
  };

  const modelText = text('model');
  if (modelText === undefined) throw bad(`no "model" key: add a row model | regular, redlich-kister, flory-huggins or nrtl`);
  const family = FAMILIES[modelText.toLowerCase()];
  if (!family) throw bad(`model "${modelText}" is unknown: write regular, redlich-kister, flory-huggins or nrtl`);

  for (const key of entries.keys()) {
    if (COMMON.includes(key) || FAMILY_KEYS[family](key)) continue;
    const owner = (Object.keys(FAMILY_KEYS) as Family[]).find((f) => FAMILY_KEYS[f](key));
    if (owner) throw bad(`"${key}" belongs to a ${owner} card, not to this ${family} card: remove it or change the model`);
    throw bad(`unknown key "${key}": the keys are ${ALL_KEYS.join(', ')} (L1, L2, ... for more terms)`);
  }

  const names = { A: text('name A') ?? 'A', B: text('name B') ?? 'B' };
  if (names.A.toLowerCase() === names.B.toLowerCase()) throw bad(`"name A" and "name B" are both "${names.A}": give the components different names`);
  if (names.A.toLowerCase() === 'b' || names.B.toLowerCase() === 'a') throw bad(`a component named "${names.A.toLowerCase() === 'b' ? names.A : names.B}" would be taken for the other component's letter: choose another name`);
  try {
    const energy = energyUnit(text('energy') ?? 'J/mol');
    const temperature = temperatureUnit(text('temperature') ?? 'K');
    const J = energy.toJoulePerMole;
    const unitNote = `energies in ${energy.name}, temperatures in ${temperature.name}`;
    switch (family) {
      case 'regular': {
        const omega = num('omega');
        if (omega === undefined) throw bad('a regular card needs "omega" (the interaction energy)');
        return { model: redlichKister([{ a: omega * J, b: 0, c: 0 }]), energy, temperature, names, description: `regular solution, omega = ${omega} ${energy.name}; ${unitNote}` };
      }
      case 'redlich-kister': {
        const orders = [...entries.keys()].filter((k) => k.startsWith('L')).map((k) => Number(/^L(\d+)/.exec(k)![1]));
        if (orders.length === 0) throw bad('a redlich-kister card needs at least "L0"');
        const n = Math.max(...orders) + 1;
        const terms = [];
        const words = [];
        for (let k = 0; k < n; k++) {
          const a = num(`L${k}`), b = num(`L${k}.b`), c = num(`L${k}.c`);
          if (a === undefined && b === undefined && c === undefined) throw bad(`L${k} is missing while L${n - 1} is given: write L${k} | 0 for a term that is zero`);
          terms.push({ a: (a ?? 0) * J, b: (b ?? 0) * J, c: (c ?? 0) * J });
          words.push(`L${k} = ${a ?? 0}${signed(b, 'T')}${signed(c, 'T ln T')}`);
        }
        return { model: redlichKister(terms), energy, temperature, names, description: `Redlich–Kister, ${n} term${n > 1 ? 's' : ''}: ${words.join('; ')} (${energy.name}, T in K); ${unitNote}` };
      }
      case 'flory-huggins': {
        const NA = num('NA'), NB = num('NB'), A = num('chi.A'), B = num('chi.B');
        if (NA === undefined || NB === undefined) throw bad(`a flory-huggins card needs "NA" and "NB" (chain lengths; 1 for a solvent)`);
        if (A === undefined && B === undefined) throw bad(`a flory-huggins card needs "chi.A" and/or "chi.B" (chi = chi.A + chi.B / T, T in K)`);
        return { model: floryHuggins({ NA, NB, A: A ?? 0, B: B ?? 0 }), energy, temperature, names, description: `Flory–Huggins, NA = ${NA}, NB = ${NB}, chi = ${A ?? 0} + ${B ?? 0}/T (T in K); composition = volume fraction of ${names.B}; ${unitNote}` };
      }
      case 'nrtl': {
        const a12 = num('a12'), b12 = num('b12'), a21 = num('a21'), b21 = num('b21'), alpha = num('alpha');
        if (a12 === undefined && b12 === undefined) throw bad(`an nrtl card needs "a12" and/or "b12" (tau12 = a12 + b12 / T)`);
        if (a21 === undefined && b21 === undefined) throw bad(`an nrtl card needs "a21" and/or "b21" (tau21 = a21 + b21 / T)`);
        if (alpha === undefined) throw bad(`an nrtl card needs "alpha" (non-randomness, typically 0.2 to 0.47)`);
        return {
          model: nrtl({ a12: a12 ?? 0, b12: b12 ?? 0, a21: a21 ?? 0, b21: b21 ?? 0, alpha }), energy, temperature, names,
          description: `NRTL, tau12 = ${a12 ?? 0} + ${b12 ?? 0}/T, tau21 = ${a21 ?? 0} + ${b21 ?? 0}/T, alpha = ${alpha} (T in K); ${unitNote}`,
        };
      }
    }
  } catch (e) {
    if (e instanceof MixgapError) throw bad(e.message);
    throw e;
  }
}

/** " + 3 T" or " - 3 T" for a nonzero coefficient, "" for zero or none. */
export function signed(v: number | undefined, symbol: string): string {
  return v ? ` ${v < 0 ? '-' : '+'} ${Math.abs(v)} ${symbol}` : '';
}
