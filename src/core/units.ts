/**
 * Units of parameter cards, by mathjs units. Conversions are resolved once, when a card is read,
 * into a factor (energies) or an offset (temperatures); the solvers work in J/mol and kelvin.
 */
import { create, createUnitDependencies, unitDependencies } from 'mathjs';
import { AVOGADRO, CALORIE, ELECTRONVOLT } from './constants';
import { fail } from './errors';

let unitSystem: ReturnType<typeof create> | undefined;

/**
 * The mathjs unit system with our units, built on first use (building it takes tens of
 * milliseconds, which every start of the command would pay otherwise).
 */
function units(): ReturnType<typeof create> {
  if (unitSystem) return unitSystem;
  const math = create({ unitDependencies, createUnitDependencies });
  // mathjs has no calorie; the thermochemical calorie is exactly 4.184 J.
  math.createUnit('cal', { definition: `${CALORIE} J`, prefixes: 'short' });
  // mathjs's eV predates the 2019 SI value; the exact one is 1.602176634e-19 J.
  math.createUnit('eV', { definition: `${ELECTRONVOLT} J`, prefixes: 'short' }, { override: true });
  // One atom is 1/N_A mol, so 1 eV/atom = 96485.33212 J/mol.
  math.createUnit('atom', { definition: `${1 / AVOGADRO} mol` });
  return (unitSystem = math);
}

/** An energy unit of a card: its name as written and J/mol per unit. */
export interface EnergyUnit {
  name: string;
  toJoulePerMole: number;
}

/** A temperature unit of a card: kelvin = value + offset. */
export interface TemperatureUnit {
  name: 'K' | '°C';
  offset: number;
}

export const ENERGY_UNITS = ['J/mol', 'kJ/mol', 'cal/mol', 'kcal/mol', 'eV/atom'] as const;

/** Reads an energy unit (one of ENERGY_UNITS, any case). */
export function energyUnit(text: string): EnergyUnit {
  const name = ENERGY_UNITS.find((u) => u.toLowerCase() === text.trim().toLowerCase().replace(/\s+/g, ''));
  if (!name) fail('input', `energy unit "${text}" is not one Mixgap reads: write one of ${ENERGY_UNITS.join(', ')}`);
  return { name, toJoulePerMole: units().unit(1, name).toNumber('J/mol') };
}

/** Reads a temperature unit: K (kelvin) or °C (also written C, degC). */
export function temperatureUnit(text: string): TemperatureUnit {
  const t = text.trim().toLowerCase();
  if (t === 'k' || t === 'kelvin') return { name: 'K', offset: 0 };
  if (t === '°c' || t === 'c' || t === 'degc' || t === 'celsius') return { name: '°C', offset: units().unit(0, 'degC').toNumber('K') };
  return fail('input', `temperature unit "${text}" is not one Mixgap reads: write K or °C`);
}

export const JOULE_PER_MOLE: EnergyUnit = { name: 'J/mol', toJoulePerMole: 1 };
export const KELVIN: TemperatureUnit = { name: 'K', offset: 0 };
