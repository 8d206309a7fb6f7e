/**
 * Units of parameter cards: energy factors and the Celsius offset against their exact definitions,
 * and units Mixgap does not read refused with a message that names them.
 */
import { describe, expect, it } from 'vitest';
import { MixgapError } from '../../src/core/errors';
import { ENERGY_UNITS, energyUnit, temperatureUnit } from '../../src/core/units';

/** The failure f throws, as reason and message (a MixgapError is what the card reader turns into #VALUE!). */
function failure(f: () => unknown): { reason: string; message: string } {
  try {
    f();
  } catch (e) {
    if (e instanceof MixgapError) return { reason: e.reason, message: e.message };
    return { reason: `not a MixgapError: ${String(e)}`, message: '' };
  }
  return { reason: 'no error', message: '' };
}

/** |got - want| <= rel |want|. */
function expectClose(got: number, want: number, rel: number, what: string): void {
  const err = Math.abs(got - want);
  if (!(err <= rel * Math.abs(want))) expect.fail(`${what}: got ${got}, want ${want} (relative error ${(err / Math.abs(want)).toExponential(2)})`);
}

// A conversion factor is at most a few double multiplications or divisions of exact decimal
// inputs, each rounding by at most 2^-53 = 1.1e-16 relative: 4.4e-16 allows four such roundings
// and nothing more (a wrong constant, e.g. the pre-2019 eV 1.6021766208e-19 J, is off by 1e-8).
const REL = 4.4e-16;

describe('energy units against their exact definitions', () => {
  it('J/mol is the unit itself', () => {
    expect(energyUnit('J/mol').toJoulePerMole).toBe(1);
  });

  it('kJ/mol = 1000 J/mol', () => {
    // BIPM, The International System of Units (SI Brochure), 9th ed. (2019), Table 7: prefix kilo = 10^3
    expectClose(energyUnit('kJ/mol').toJoulePerMole, 1000, REL, 'kJ/mol');
  });

  it('cal/mol = 4.184 J/mol and kcal/mol = 4184 J/mol (thermochemical calorie, exact)', () => {
    // NIST SP 811, Guide for the Use of the International System of Units (Thompson & Taylor, 2008),
    // appendix B.8: 1 cal_th = 4.184 J exactly
    expectClose(energyUnit('cal/mol').toJoulePerMole, 4.184, REL, 'cal/mol');
    expectClose(energyUnit('kcal/mol').toJoulePerMole, 4184, REL, 'kcal/mol');
  });

  it('eV/atom = e N_A J/mol = 96485.33212331001... J/mol with the exact 2019 constants', () => {
    // BIPM, SI Brochure, 9th ed. (2019), section 2.2 (Table 1, defining constants): e = 1.602176634e-19 C
    // and N_A = 6.02214076e23 mol^-1 exactly, so 1 eV/atom = e N_A J/mol (1 eV = e x 1 V).
    // The product of the two exact decimals, in integers: 1602176634 x 602214076 x 10^(-19-9+23-8).
    const digits = (1602176634n * 602214076n).toString(); // 964853321233100184 x 10^-13
    const exact = Number(`${digits.slice(0, 5)}.${digits.slice(5)}`);
    expect(digits).toBe('964853321233100184');
    expectClose(energyUnit('eV/atom').toJoulePerMole, exact, REL, 'eV/atom');
    // the rounded value the issue quotes, 96485.33212 J/mol, to its 10 digits
    expect(Math.abs(energyUnit('eV/atom').toJoulePerMole - 96485.33212)).toBeLessThan(0.5e-5);
  });

  it('names are read without regard to case or spaces, and given back as Mixgap spells them', () => {
    expect(energyUnit(' KJ / MOL ').name).toBe('kJ/mol');
    expect(energyUnit('ev/ATOM').name).toBe('eV/atom');
    expectClose(energyUnit('KCAL/mol').toJoulePerMole, 4184, REL, 'KCAL/mol');
  });

  it('every unit Mixgap lists is read back under its own name', () => {
    for (const u of ENERGY_UNITS) expect(energyUnit(u).name).toBe(u);
  });
});

describe('temperature units', () => {
  it('°C: T/K = t/°C + 273.15, exactly', () => {
    // BIPM, SI Brochure, 9th ed. (2019), section 2.3.1: t/°C = T/K - 273.15
    for (const name of ['°C', 'C', 'degC', 'celsius', ' °c ']) {
      const unit = temperatureUnit(name);
      expect(unit.name, name).toBe('°C');
      expect(unit.offset, name).toBe(273.15);
    }
  });

  it('K: no offset', () => {
    for (const name of ['K', 'k', 'kelvin']) expect(temperatureUnit(name)).toEqual({ name: 'K', offset: 0 });
  });
});

describe('units Mixgap does not read are refused, naming the unit', () => {
  // common practice, no published source: an energy per mass, a bare energy without "per mole",
  // or a unit outside the list must not be taken for something else.
  for (const text of ['kJ', 'J/kg', 'eV', 'BTU/lb', 'J/mole K', 'kJ/kmol', '']) {
    it(`energy "${text}"`, () => {
      const f = failure(() => energyUnit(text));
      expect(f.reason).toBe('input');
      expect(f.message).toContain(`"${text}"`);
      expect(f.message).toContain('J/mol'); // says what to write instead
    });
  }
  for (const text of ['F', '°F', 'R', 'kK', 'degK2']) {
    it(`temperature "${text}"`, () => {
      const f = failure(() => temperatureUnit(text));
      expect(f.reason).toBe('input');
      expect(f.message).toContain(`"${text}"`);
      expect(f.message).toContain('°C');
    });
  }
});
