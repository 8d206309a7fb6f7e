/**
 * Reading the two ranges of the general fit (FITMODEL and its siblings in ./fitModel.ts):
 *
 * The start card: a parameter card (./card.ts: key | value) with a third column that says which
 * parameters the fit moves:
 *   model        | flory-huggins
 *   NA           | 1
 *   NB           | 300   | fixed
 *   chi.A        |       | fit       a free parameter without a value starts from the core's default
 *   chi.B        | 250   | fit       a free parameter with a value starts there
 *   temperature  | °C
 * A parameter row without a third cell is fixed. `energy`, `temperature`, `name A`, `name B` as on
 * any card. Rows `u(...)` and `r(...)` (a fitted card used again as a start) are skipped.
 *
 * The data table: one measurement per row, its kind in the first column, temperatures in the
 * card's temperature unit:
 *   tie-line        | T  | x'  | x''        | [u]     u of x' and x''
 *   boundary        | T  | x   | low/high   | [u]     u of x
 *   cloud point     | T  | x0  |            | [u]     u of T
 *   critical point  | Tc | [xc]|            | [u]     u of Tc  | [u of xc]
 * Empty rows are skipped, and a first row of column titles.
 */
import { MixgapError } from '../core/errors';
import { orList, owns, type ModelFamily } from '../core/family';
import type { Measurement } from '../core/fit/measurements';
import { parameterDimension, type ParameterSpec } from '../core/fit/parameters';
import { FAMILIES, familyNamed } from '../core/models';
import { energyUnit, temperatureUnit, type EnergyUnit, type TemperatureUnit } from '../core/units';
import { cardEntries } from './card';
import { choice, gridNumber, isEmpty, numberText, toGrid } from './cells';
import { CellFailure } from './errors';

export interface StartCard {
  family: ModelFamily;
  energy: EnergyUnit;
  temperature: TemperatureUnit;
  /** name A, name B when the card gives them. */
  names: { A?: string; B?: string };
  /** In the card's order; values in SI units (J/mol, K). */
  parameters: ParameterSpec[];
}

const COMMON = ['model', 'energy', 'temperature', 'name A', 'name B'];
const FAMILY_KEYS = FAMILIES.flatMap((f) => f.keys);

const badStart = (message: string) => new CellFailure('#VALUE!', `start card: ${message}`);

/** The key in its canonical spelling (as ./card.ts spells it). */
function canonical(raw: string): string {
  const k = raw.trim().replace(/\s+/g, ' ');
  for (const f of FAMILIES) {
    const own = f.moreKeys?.canonical(k);
    if (own !== undefined) return own;
  }
  return [...COMMON, ...FAMILY_KEYS].find((known) => known.toLowerCase() === k.toLowerCase()) ?? k;
}

/** u(NAME) and r(NAME1, NAME2) rows: the uncertainty of a fitted card. */
const isUncertaintyKey = (key: string) => /^[ur]\s*\(.*\)$/i.test(key.trim());

/** The factor from a parameter's card unit to SI (J/mol, J/(mol K), K, 1). */
export function toSI(name: string, energy: EnergyUnit): number {
  const d = parameterDimension(name);
  return d === 'energy' || d === 'energy per K' ? energy.toJoulePerMole : 1;
}

/** Reads the start card (see the header). */
export function readStartCard(value: unknown): StartCard {
  const grid = toGrid(value);
  const rows = new Map<string, { value: unknown; mark: unknown; where: string }>();
  for (const { key: rawKey, value: v, rest, where } of cardEntries(grid, () => false)) {
    if (typeof rawKey !== 'string' || rawKey.trim() === '') throw badStart(`${where} has no key in its first cell (found ${JSON.stringify(rawKey ?? '')})`);
    if (isUncertaintyKey(rawKey)) continue;
    if (rest.slice(1).some((c) => !isEmpty(c))) throw badStart(`${where} has more than three cells: a start card has a key, a value and "fit" or "fixed"`);
    const key = canonical(rawKey);
    if (rows.has(key)) throw badStart(`the key "${key}" appears twice: keep one`);
    rows.set(key, { value: v, mark: rest[0], where });
  }
  const text = (key: string): string | undefined => {
    const row = rows.get(key);
    if (!row) return undefined;
    if (!isEmpty(row.mark)) throw badStart(`"${key}" is not a parameter: its row takes no "fit" or "fixed"`);
    if (typeof row.value !== 'string' || row.value.trim() === '') throw badStart(`"${key}" must be text (got ${JSON.stringify(row.value ?? '')})`);
    return row.value.trim();
  };
  const modelText = text('model');
  const names = FAMILIES.map((f) => f.name);
  if (modelText === undefined) throw badStart(`no "model" key: add a row model | ${orList(names)}`);
  const family = familyNamed(modelText);
  if (!family) throw badStart(`model "${modelText}" is unknown: write ${orList(names)}`);
  let energy: EnergyUnit, temperature: TemperatureUnit;
  try {
    energy = energyUnit(text('energy') ?? 'J/mol');
    temperature = temperatureUnit(text('temperature') ?? 'K');
  } catch (e) {
    if (e instanceof MixgapError) throw badStart(e.message);
    throw e;
  }
  const card: StartCard = { family, energy, temperature, names: { A: text('name A'), B: text('name B') }, parameters: [] };
  for (const [key, row] of rows) {
    if (COMMON.includes(key)) continue;
    if (!owns(family, key)) {
      const owner = FAMILIES.find((f) => owns(f, key));
      if (owner) throw badStart(`"${key}" belongs to a ${owner.name} model, not to this ${family.name} one: remove it or change the model`);
      throw badStart(`unknown key "${key}" (${row.where}): the ${family.name} model's parameters are ${family.keys.join(', ')}${family.moreKeys ? ` (${family.moreKeys.note})` : ''}, and any card may give ${COMMON.join(', ')}`);
    }
    const free = choice(row.mark, `the third cell of "${key}"`, { fit: 'the fit moves it', fixed: 'kept at its value' }, 'fixed') === 'fit';
    let v: number | undefined;
    if (isEmpty(row.value)) {
      if (!free) throw badStart(`"${key}" has no value: give its value, or write "fit" beside it to let the fit find it`);
    } else if (typeof row.value === 'string' && numberText(row.value) !== undefined) {
      v = numberText(row.value);
    } else if (typeof row.value === 'number' && Number.isFinite(row.value)) {
      v = row.value;
    } else {
      throw badStart(`"${key}" must be a number (got ${JSON.stringify(row.value)})`);
    }
    card.parameters.push({ name: key, free, value: v === undefined ? undefined : v * toSI(key, energy) });
  }
  if (!card.parameters.some((p) => p.free)) {
    throw badStart(`no parameter is marked "fit": write "fit" in the third cell of each parameter the fit may move (${family.keys.join(', ')}${family.moreKeys ? ', ...' : ''})`);
  }
  return card;
}

/** The words of the data table's first column, and the spellings read as each. */
const KINDS = { 'tie-line': "T, x', x''", boundary: 'T, x, low or high', 'cloud point': 'T, x0', 'critical point': 'Tc and optionally xc' } as const;
type Kind = keyof typeof KINDS;
const ALIASES: Record<string, Kind> = { 'tie line': 'tie-line', tieline: 'tie-line', tie: 'tie-line', cloud: 'cloud point', 'cloud-point': 'cloud point', critical: 'critical point', 'critical-point': 'critical point' };

function kindOf(v: unknown): Kind | undefined {
  if (typeof v !== 'string') return undefined;
  const t = v.trim().toLowerCase().replace(/\s+/g, ' ');
  if (t in KINDS) return t as Kind;
  return ALIASES[t];
}

export interface DataTable {
  measurements: Measurement[];
  /** The data range's row (0-based) of each measurement. */
  rowOf: number[];
  /** Rows of the data range, empty and title rows included. */
  rows: number;
  /** Whether every measurement states its uncertainty. */
  allStated: boolean;
}

/** Reads the data table (see the header); temperatures in `temperature`, returned in kelvin. */
export function readData(value: unknown, temperature: TemperatureUnit): DataTable {
  const grid = toGrid(value);
  const out: DataTable = { measurements: [], rowOf: [], rows: grid.length, allStated: true };
  let first = true;
  grid.forEach((row, i) => {
    if (row.every(isEmpty)) return;
    const where = `data row ${i + 1}`;
    const kind = kindOf(row[0]);
    if (first && !kind && row.some((v) => typeof v === 'string' && v.trim() !== '') && !row.some((v) => typeof v === 'number')) {
      first = false;
      return; // column titles
    }
    first = false;
    if (!kind) {
      throw new CellFailure('#VALUE!', `${where}: the first cell ${isEmpty(row[0]) ? 'is empty' : `holds ${JSON.stringify(row[0])}`}: write the kind of measurement, ${Object.entries(KINDS).map(([k, v]) => `"${k}" (${v})`).join(', ')}`);
    }
    const num = (j: number, what: string) => {
      if (isEmpty(row[j])) throw new CellFailure('#VALUE!', `${where} (${kind}): ${what} (column ${j + 1}) is empty; a ${kind} row is ${kind} | ${KINDS[kind]}`);
      return gridNumber(row[j], `${where} (${kind}): ${what} (column ${j + 1})`);
    };
    const T = (j: number, what: string) => {
      const t = num(j, what);
      const K = t + temperature.offset;
      if (!(K > 0)) throw new CellFailure('#NUM!', `${where}: ${what} = ${t} ${temperature.name} is not above absolute zero`);
      return K;
    };
    const x = (j: number, what: string) => {
      const v = num(j, what);
      if (!(v > 0 && v < 1)) throw new CellFailure('#NUM!', `${where}: ${what} = ${v} must be a fraction strictly between 0 and 1${v > 1 ? ` (a ${kind} row is ${kind} | ${KINDS[kind]})` : ''}`);
      return v;
    };
    const nothing = (j: number) => {
      if (!isEmpty(row[j])) throw new CellFailure('#VALUE!', `${where}: column ${j + 1} holds ${JSON.stringify(row[j])}, but a ${kind} row is ${kind} | ${KINDS[kind]} | | uncertainty: leave column ${j + 1} empty`);
    };
    const sigma = (j: number, what: string): number | undefined => {
      if (isEmpty(row[j])) return undefined;
      const s = gridNumber(row[j], `${where}: the uncertainty of ${what} (column ${j + 1})`);
      if (!(s > 0)) throw new CellFailure('#NUM!', `${where}: the uncertainty of ${what} (column ${j + 1}) is ${s}: give a number above 0, or leave it empty for the default`);
      return s;
    };
    if (row.slice(kind === 'critical point' ? 6 : 5).some((v) => !isEmpty(v))) {
      throw new CellFailure('#VALUE!', `${where} has cells beyond column ${kind === 'critical point' ? 6 : 5}: a ${kind} row is ${kind} | ${KINDS[kind]} | uncertainty${kind === 'critical point' ? ' of Tc | uncertainty of xc' : ''}`);
    }
    let m: Measurement;
    switch (kind) {
      case 'tie-line': {
        const xLow = x(2, "x'"), xHigh = x(3, "x''");
        if (!(xLow < xHigh)) throw new CellFailure('#NUM!', `${where}: x' = ${xLow} must be below x'' = ${xHigh} (the A-rich phase in column 3)`);
        m = { kind, T: T(1, 'T'), xLow, xHigh, sigma: sigma(4, "x' and x''") };
        break;
      }
      case 'boundary': {
        const side = choice(row[3], `${where}: the side (column 4)`, { low: "the A-rich boundary x'", high: "the B-rich boundary x''" });
        m = { kind, T: T(1, 'T'), x: x(2, 'x'), side, sigma: sigma(4, 'x') };
        break;
      }
      case 'cloud point':
        nothing(3);
        m = { kind, T: T(1, 'T'), x0: x(2, 'x0'), sigma: sigma(4, 'T') };
        break;
      case 'critical point': {
        nothing(3);
        const xc = isEmpty(row[2]) ? undefined : x(2, 'xc');
        if (xc === undefined && !isEmpty(row[5])) throw new CellFailure('#VALUE!', `${where}: column 6 gives the uncertainty of xc, but the row has no xc (column 3)`);
        m = { kind, Tc: T(1, 'Tc'), xc, sigmaT: sigma(4, 'Tc'), sigmaX: sigma(5, 'xc') };
        break;
      }
    }
    const stated = m.kind === 'critical point' ? m.sigmaT !== undefined && (m.xc === undefined || m.sigmaX !== undefined) : m.sigma !== undefined;
    if (!stated) out.allStated = false;
    out.measurements.push(m);
    out.rowOf.push(i);
  });
  if (out.measurements.length === 0) {
    throw new CellFailure('#VALUE!', `data holds no measurements: give one row per measurement, its kind first: ${Object.entries(KINDS).map(([k, v]) => `${k} | ${v}`).join('; ')}`);
  }
  return out;
}
