/**
 * Parameter cards through the cell functions (called directly, as Node runs them: a failure is
 * thrown as a CellFailure with its code and message). A card must describe exactly the model the
 * core builds from the same parameters, in the card's energy and temperature units; a card that
 * is misspelled, incomplete or contradictory must give #VALUE! naming the key to fix; a bare
 * number and a numeric Redlich–Kister range keep working. Flory–Huggins closed forms are checked
 * through the cell functions.
 */
import { describe, expect, it } from 'vitest';
import { activities, decompositionGain, drivingForce, excessGibbs } from '../../src/core/activity';
import { phaseMap } from '../../src/core/binodal';
import { criticalPoints } from '../../src/core/critical';
import type { BinaryModel } from '../../src/core/model';
import { floryHuggins, type FloryHugginsParameters } from '../../src/core/models/floryHuggins';
import { nrtl, type NrtlParameters } from '../../src/core/models/nrtl';
import { redlichKister, regularSolution, type RedlichKisterTerm } from '../../src/core/models/redlichKister';
import { CellFailure } from '../../src/functions/errors';
import {
  actCoef, activity, chemPot, checkCard, critCount, critKind, decompGain, driveForce, gapCount, gapHigh, gapLow,
  gapTable, gExcess, gMix, phaseFrac, spinHigh, spinLow, tCrit, tGap, xCrit,
} from '../../src/functions/functions';
import { regularBinodal } from '../core/support/closedForms';
import { failure } from './support/failure';

/** R from the spec (CODATA 2018, exact by the 2019 SI definitions). */
const R = 8.314462618;

type Card = unknown[][];

/** |got - want| <= rel |want| (+ abs). */
function expectClose(got: unknown, want: number, rel: number, what: string, abs = 0): void {
  if (typeof got !== 'number') expect.fail(`${what}: got ${String(got)}, want ${want}`);
  const err = Math.abs(got - want);
  if (!(err <= rel * Math.abs(want) + abs)) expect.fail(`${what}: got ${got}, want ${want} (error ${err.toExponential(2)})`);
}

// Solves through a card go through the shared solve memory, which starts each solve from the last
// temperature solved for the same model; a fresh core solve starts from scratch. Both stop Newton
// after a step below 1e-12 in u (quadratic convergence: error below 1e-20), so they agree to
// rounding, ~1e-15; 1e-12 relative leaves ample margin and still catches any parameter read
// wrongly (a wrong digit or unit moves answers by far more).
const SOLVE = 1e-12;
// Critical points: see test/core/critical.test.ts (roots resolved to ~1e-13; 1e-9 allows for
// their conditioning).
const CRIT = 1e-9;

interface ModelCase {
  name: string;
  card: Card;
  model: BinaryModel;
  T: number;
  xs: number[];
}

const rkTerms: RedlichKisterTerm[] = [{ a: 22000, b: -4, c: 0 }, { a: 3000, b: 1.5, c: 0 }, { a: -500, b: 0, c: 0.1 }];
const fhP: FloryHugginsParameters = { NA: 1, NB: 100, A: 0.2, B: 150 };
const nrtlP: NrtlParameters = { a12: -0.5, b12: 600, a21: 0.8, b21: 400, alpha: 0.3 };

const MODELS: ModelCase[] = [
  { name: 'regular', card: [['model', 'regular'], ['omega', 20000]], model: regularSolution(20000), T: 900, xs: [0.05, 0.3, 0.5] },
  {
    name: 'redlich-kister (keys L0, L0.b, L1, L1.b, L2, L2.c)',
    card: [['model', 'redlich-kister'], ['L0', 22000], ['L0.b', -4], ['L1', 3000], ['L1.b', 1.5], ['L2', -500], ['L2.c', 0.1]],
    model: redlichKister(rkTerms), T: 800, xs: [0.05, 0.4, 0.9],
  },
  {
    name: 'flory-huggins',
    card: [['model', 'flory-huggins'], ['NA', 1], ['NB', 100], ['chi.A', 0.2], ['chi.B', 150]],
    model: floryHuggins(fhP), T: 300, xs: [0.001, 0.1, 0.6],
  },
  {
    name: 'nrtl',
    card: [['model', 'nrtl'], ['a12', -0.5], ['b12', 600], ['a21', 0.8], ['b21', 400], ['alpha', 0.3]],
    model: nrtl(nrtlP), T: 320, xs: [0.1, 0.5, 0.95],
  },
];

describe('every model through a card gives the numbers of the core model built directly', () => {
  for (const { name, card, model, T, xs } of MODELS) {
    it(name, () => {
      const iso = model.at(T);
      const map = phaseMap(iso);
      expect(map.gaps.length).toBeGreaterThan(0);
      expect(gapCount(T, card as any)).toBe(map.gaps.length);
      expectClose(gapLow(T, card as any), map.gaps[0].low.x, SOLVE, 'GAPLOW');
      expectClose(gapHigh(T, card as any), map.gaps[0].high.x, SOLVE, 'GAPHIGH');
      expectClose(spinLow(T, card as any), map.spinodal[0].x, SOLVE, 'SPINLOW');
      expectClose(spinHigh(T, card as any), map.spinodal[1].x, SOLVE, 'SPINHIGH');
      const points = criticalPoints(model);
      expect(critCount(card as any)).toBe(points.length);
      points.forEach((p, i) => {
        expectClose(tCrit(card as any, i + 1), p.T, CRIT, `TCRIT ${i + 1}`);
        expectClose(xCrit(card as any, i + 1), p.x, CRIT, `XCRIT ${i + 1}`);
        expect(critKind(card as any, i + 1)).toBe(p.kind);
      });
      for (const x of xs) {
        // the same arithmetic on the same parameters: bit-exact
        const a = activities(model, T, x);
        expect(activity(x, T, card as any, 'A')).toBe(Math.exp(a.lnA));
        expect(activity(x, T, card as any, 'B')).toBe(Math.exp(a.lnB));
        expect(actCoef(x, T, card as any, 'A')).toBe(Math.exp(a.lnGammaA));
        expect(chemPot(x, T, card as any, 'B')).toBe(a.muB);
        expect(gMix(x, T, card as any)).toBe(iso.g(x, 1 - x));
        expect(gExcess(x, T, card as any)).toBe(excessGibbs(iso, x));
        // the phase map of the card's solve vs a fresh one: to rounding (see SOLVE)
        expectClose(driveForce(x, T, card as any), drivingForce(iso, map, x), SOLVE, `DRIVEFORCE at ${x}`, 1e-9);
        expectClose(decompGain(x, T, card as any), decompositionGain(iso, map, x), SOLVE, `DECOMPGAIN at ${x}`, 1e-9);
      }
    });
  }

  it('keys are read in any case and with spaces around them; model short names rk and fh', () => {
    const card = [[' MODEL ', 'FH'], ['na', 1], ['nb', 100], ['CHI.a', 0.2], ['chi.b ', 150]];
    expect(gapLow(300, card as any)).toBe(gapLow(300, MODELS[2].card as any));
    const rk = [['Model', 'RK'], ['l0', 22000], ['L0.B', -4], ['l1', 3000], ['L1.b', 1.5], ['L2', -500], ['l2.C', 0.1]];
    expect(tCrit(rk as any)).toBe(tCrit(MODELS[1].card as any));
  });
});

describe('energy units: a card in kJ/mol, cal/mol, kcal/mol or eV/atom is the J/mol card', () => {
  // Exact unit definitions (see test/core/units.test.ts for their sources): 1 kJ = 1000 J,
  // 1 cal = 4.184 J, 1 eV/atom = e N_A J/mol = 96485.33212331001 J/mol (2019 SI).
  const units: Array<[string, number]> = [['kJ/mol', 1000], ['cal/mol', 4.184], ['kcal/mol', 4184], ['eV/atom', 96485.33212331001]];
  const omegaJ = 20000;
  const jCard = [['model', 'regular'], ['omega', omegaJ]];
  const T = 900;
  // Parameters in the card's unit are multiplied by the factor (one rounding, 1.1e-16), answers
  // divided by it (one more): energies agree to a few 1e-16 relative; compositions and
  // temperatures move by the parameter's rounding times their sensitivity (of order 1):
  // 1e-14 relative covers both.
  const REL = 1e-14;
  for (const [unit, factor] of units) {
    it(`regular card in ${unit}`, () => {
      const card = [['model', 'regular'], ['omega', omegaJ / factor], ['energy', unit]];
      expectClose(tCrit(card as any), tCrit(jCard as any), REL, 'TCRIT');
      expectClose(gapLow(T, card as any), gapLow(T, jCard as any), REL, 'GAPLOW');
      expectClose(spinHigh(T, card as any), spinHigh(T, jCard as any), REL, 'SPINHIGH');
      expectClose(activity(0.2, T, card as any), activity(0.2, T, jCard as any), REL, 'ACTIVITY');
      // energy results come back in the card's unit
      expectClose(gMix(0.2, T, card as any), gMix(0.2, T, jCard as any) / factor, REL, 'GMIX');
      expectClose(chemPot(0.2, T, card as any, 'A'), chemPot(0.2, T, jCard as any, 'A') / factor, REL, 'CHEMPOT');
      expectClose(gExcess(0.2, T, card as any), gExcess(0.2, T, jCard as any) / factor, REL, 'GEXCESS');
      expectClose(driveForce(0.2, T, card as any), driveForce(0.2, T, jCard as any) / factor, REL, 'DRIVEFORCE');
      expectClose(decompGain(0.2, T, card as any), decompGain(0.2, T, jCard as any) / factor, REL, 'DECOMPGAIN');
    });
  }

  it('Redlich–Kister card in kJ/mol: L_k and their T coefficients scale alike', () => {
    const card = [['model', 'rk'], ['energy', 'kJ/mol'], ['L0', 22], ['L0.b', -0.004], ['L1', 3], ['L1.b', 0.0015]];
    const range = [[22000, -4, 0], [3000, 1.5, 0]];
    expectClose(tCrit(card as any), tCrit(range), REL, 'TCRIT');
    expectClose(gapHigh(800, card as any), gapHigh(800, range), REL, 'GAPHIGH');
    expectClose(gMix(0.3, 800, card as any), gMix(0.3, 800, range) / 1000, REL, 'GMIX');
  });

  it('NRTL and Flory–Huggins cards: parameters have no energy unit, energy results do', () => {
    for (const base of [MODELS[2].card, MODELS[3].card]) {
      const card = [...base, ['energy', 'kcal/mol']];
      const T = base === MODELS[2].card ? 300 : 320;
      expect(gapLow(T, card as any)).toBe(gapLow(T, base as any));
      expect(activity(0.3, T, card as any)).toBe(activity(0.3, T, base as any));
      expectClose(gMix(0.3, T, card as any), gMix(0.3, T, base as any) / 4184, REL, 'GMIX');
      expectClose(chemPot(0.3, T, card as any, 'B'), chemPot(0.3, T, base as any, 'B') / 4184, REL, 'CHEMPOT');
      expectClose(driveForce(0.3, T, card as any), driveForce(0.3, T, base as any) / 4184, REL, 'DRIVEFORCE');
    }
  });
});

describe('°C cards: temperatures read and given back in °C', () => {
  // BIPM, SI Brochure, 9th ed. (2019), section 2.3.1: t/°C = T/K - 273.15
  const omega = 20000;
  const kCard = [['model', 'regular'], ['omega', omega]];
  const cCard = [['model', 'regular'], ['omega', omega], ['temperature', '°C']];

  it('TCRIT in °C: Omega/(2R) - 273.15', () => {
    // Porter, Easterling & Sherif, Phase Transformations in Metals and Alloys, 3rd ed. (2009), ch. 1: Tc = Omega/2R
    expectClose(tCrit(cCard as any) + 273.15, omega / (2 * R), CRIT, 'TCRIT (°C) + 273.15');
    // the same solve as the kelvin card, shifted: exact up to the rounding of the subtraction
    expectClose(tCrit(cCard as any), tCrit(kCard as any) - 273.15, 1e-15, 'TCRIT °C vs K');
  });

  it('TGAP in °C: the temperature of the closed-form binodal through x0', () => {
    // Hillert (2008); Porter, Easterling & Sherif (2009), ch. 1: regular-solution binodal
    // ln[x/(1-x)] = Omega(2x-1)/(RT), so x0 lies on it at T = Omega(2x0-1)/(R ln[x0/(1-x0)]).
    // gapTemperature bisects to 1e-13 relative: 1e-9 allows for the binodal's conditioning.
    for (const x0 of [0.05, 0.2, 0.35, 0.8]) {
      const T = (omega * (2 * x0 - 1)) / (R * Math.log(x0 / (1 - x0)));
      expectClose(tGap(x0, cCard as any) + 273.15, T, 1e-9, `TGAP at ${x0}`);
    }
  });

  it('a whole grid of °C temperatures is read as kelvin + 273.15', () => {
    // Each t + 273.15 is the same double of kelvin whichever card is used, so the answers are the
    // same solve: bit-exact. A wrong offset (273, or a sign) would move every one of them.
    const grid = [-150, -40.5, 0, 25, 250.25, 500, 655.5];
    for (const t of grid) {
      expect(gapLow(t, cCard as any), `GAPLOW at ${t} °C`).toBe(gapLow(t + 273.15, kCard as any));
      expect(spinLow(t, cCard as any), `SPINLOW at ${t} °C`).toBe(spinLow(t + 273.15, kCard as any));
      expect(gMix(0.3, t, cCard as any), `GMIX at ${t} °C`).toBe(gMix(0.3, t + 273.15, kCard as any));
      expect(phaseFrac(0.4, t, cCard as any), `PHASEFRAC at ${t} °C`).toBe(phaseFrac(0.4, t + 273.15, kCard as any));
      expect(activity(0.3, t, cCard as any, 'A'), `ACTIVITY at ${t} °C`).toBe(activity(0.3, t + 273.15, kCard as any, 'A'));
    }
    // and against the closed form at one of them: 25 °C = 298.15 K
    expectClose(gapLow(25, cCard as any), regularBinodal(omega, 25 + 273.15).x, 1e-12, 'GAPLOW at 25 °C');
  });

  it('GAPTABLE: T column in °C, evenly spaced between the °C ends, rows as at T + 273.15', () => {
    const t1 = 300, t2 = 900, rows = 7;
    const table = gapTable(t1, t2, rows, cCard as any) as number[][];
    expect(table).toHaveLength(rows);
    table.forEach((row, i) => {
      const t = t1 + ((t2 - t1) * i) / (rows - 1);
      // (t + 273.15) spaced in K and 273.15 taken off again: a few ulps of 1200 (2.3e-13 each)
      expectClose(row[0], t, 0, `T column, row ${i}`, 1e-12);
      expectClose(row[1], gapLow(row[0] + 273.15, kCard as any), SOLVE, `binodal low, row ${i}`);
      expectClose(row[2], gapHigh(row[0] + 273.15, kCard as any), SOLVE, `binodal high, row ${i}`);
    });
  });

  it('GAPTABLE: a critical temperature inside the range gives its row in °C', () => {
    const Tc = omega / (2 * R) - 273.15; // 929.57 °C
    const table = gapTable(800, 1000, 11, cCard as any) as unknown[][];
    const critical = table.find((row) => Math.abs((row[0] as number) - Tc) < 10);
    expect(critical, 'a row at the critical temperature').toBeDefined();
    expectClose(critical![0], Tc, CRIT, 'critical row T (°C)');
    for (const k of [1, 2, 3, 4]) expectClose(critical![k], 0.5, 0, `critical row column ${k}`, CRIT);
  });

  it('temperatures at or below absolute zero in °C are refused with #NUM!', () => {
    for (const t of [-273.15, -300]) {
      const f = failure(() => gapLow(t, cCard as any));
      expect(f.code).toBe('#NUM!');
      expect(f.message).toContain('°C');
    }
  });

  it('CHECKCARD says which units the card uses', () => {
    const text = checkCard([['model', 'regular'], ['omega', 20], ['energy', 'kJ/mol'], ['temperature', 'C']] as any);
    expect(text).toContain('kJ/mol');
    expect(text).toContain('°C');
  });
});

describe('component names from the card', () => {
  const card = [['model', 'nrtl'], ['a12', -0.5], ['b12', 600], ['a21', 0.8], ['b21', 400], ['alpha', 0.3], ['name A', 'water'], ['name B', '1-butanol']];

  it('"water" and "1-butanol" (any case) stand for A and B', () => {
    for (const f of [activity, actCoef, chemPot]) {
      expect(f(0.3, 320, card as any, 'water')).toBe(f(0.3, 320, card as any, 'A'));
      expect(f(0.3, 320, card as any, 'Water ')).toBe(f(0.3, 320, card as any, 'A'));
      expect(f(0.3, 320, card as any, '1-BUTANOL')).toBe(f(0.3, 320, card as any, 'B'));
      expect(f(0.3, 320, card as any, 'a')).toBe(f(0.3, 320, card as any, 'A'));
    }
    // and the default is B
    expect(activity(0.3, 320, card as any)).toBe(activity(0.3, 320, card as any, 'B'));
  });

  it('a name the card does not give is #VALUE!, listing the names it does', () => {
    const f = failure(() => activity(0.3, 320, card as any, 'ethanol'));
    expect(f.code).toBe('#VALUE!');
    expect(f.message).toContain('ethanol');
    expect(f.message).toContain('water');
    expect(f.message).toContain('1-butanol');
  });
});

describe('misspelled, incomplete and contradictory cards: #VALUE! naming the key', () => {
  const cases: Array<{ what: string; card: Card; says: string[] }> = [
    { what: 'a key given twice (in two spellings)', card: [['model', 'regular'], ['omega', 20000], ['Omega', 21000]], says: ['"omega"', 'twice'] },
    { what: 'L0 given twice (L0 and L0.a)', card: [['model', 'rk'], ['L0', 20000], ['L0.a', 21000]], says: ['"L0"', 'twice'] },
    { what: 'an unknown (misspelled) key', card: [['model', 'regular'], ['omgea', 20000]], says: ['"omgea"'] },
    { what: 'no model', card: [['omega', 20000], ['energy', 'J/mol']], says: ['"model"'] },
    { what: 'an unknown model', card: [['model', 'regullar'], ['omega', 20000]], says: ['"regullar"'] },
    { what: 'a regular card without omega', card: [['model', 'regular'], ['energy', 'kJ/mol']], says: ['"omega"'] },
    { what: 'a redlich-kister card without any L', card: [['model', 'redlich-kister'], ['energy', 'kJ/mol']], says: ['"L0"'] },
    { what: 'a redlich-kister card with L2 but no L1', card: [['model', 'rk'], ['L0', 20000], ['L2', 3000]], says: ['L1'] },
    { what: 'a flory-huggins card without NA', card: [['model', 'flory-huggins'], ['NB', 100], ['chi.A', 0.5]], says: ['"NA"'] },
    { what: 'a flory-huggins card without chi', card: [['model', 'fh'], ['NA', 1], ['NB', 100]], says: ['"chi.A"'] },
    { what: 'an nrtl card without alpha', card: [['model', 'nrtl'], ['a12', 1], ['a21', 2]], says: ['"alpha"'] },
    { what: 'an nrtl card without tau21', card: [['model', 'nrtl'], ['a12', 1], ['alpha', 0.3]], says: ['"a21"'] },
    { what: 'a key of another model (alpha on a regular card)', card: [['model', 'regular'], ['omega', 20000], ['alpha', 0.3]], says: ['"alpha"', 'nrtl'] },
    { what: 'a key of another model (omega on an nrtl card)', card: [['model', 'nrtl'], ['a12', 1], ['a21', 2], ['alpha', 0.3], ['omega', 5]], says: ['"omega"', 'regular'] },
    { what: 'a key of another model (NB on a redlich-kister card)', card: [['model', 'rk'], ['L0', 20000], ['NB', 100]], says: ['"NB"', 'flory-huggins'] },
    { what: 'text where a number goes', card: [['model', 'regular'], ['omega', '20 kJ']], says: ['"omega"', 'number'] },
    { what: 'TRUE where a number goes', card: [['model', 'nrtl'], ['a12', 1], ['a21', 2], ['alpha', true]], says: ['"alpha"', 'number'] },
    { what: 'a number where text goes (model)', card: [['model', 3], ['omega', 20000]], says: ['"model"', 'text'] },
    { what: 'a number where text goes (energy)', card: [['model', 'regular'], ['omega', 20000], ['energy', 1000]], says: ['"energy"', 'text'] },
    { what: 'a number where text goes (name B)', card: [['model', 'regular'], ['omega', 20000], ['name B', 7]], says: ['"name B"', 'text'] },
    { what: 'an empty value (null)', card: [['model', 'regular'], ['omega', null]], says: ['"omega"', 'no value'] },
    { what: 'an empty value (empty text)', card: [['model', 'nrtl'], ['a12', 1], ['a21', ''], ['alpha', 0.3]], says: ['"a21"', 'no value'] },
    { what: 'a third column', card: [['model', 'regular'], ['omega', 20000, 'J/mol']], says: ['row 2', 'two'] },
    { what: 'an energy unit Mixgap does not read', card: [['model', 'regular'], ['omega', 20], ['energy', 'kJ']], says: ['"kJ"'] },
    { what: 'a temperature unit Mixgap does not read', card: [['model', 'regular'], ['omega', 20000], ['temperature', '°F']], says: ['"°F"'] },
    { what: 'a chain length below 1', card: [['model', 'fh'], ['NA', 0.5], ['NB', 100], ['chi.A', 0.5]], says: ['NA'] },
    { what: 'alpha = 0', card: [['model', 'nrtl'], ['a12', 1], ['a21', 2], ['alpha', 0]], says: ['alpha'] },
  ];
  for (const { what, card, says } of cases) {
    it(what, () => {
      // every cell function reads the card the same way; GAPLOW and ACTIVITY stand for all
      for (const f of [() => gapLow(300, card as any), () => activity(0.3, 300, card as any)]) {
        const e = failure(f);
        expect(e.code, e.message).toBe('#VALUE!');
        for (const s of says) expect(e.message).toContain(s);
      }
    });
  }
});

describe('a bare number and a numeric Redlich–Kister range keep working (J/mol, kelvin)', () => {
  it('a bare number is the regular solution Omega in J/mol', () => {
    // Hillert (2008); Porter, Easterling & Sherif (2009), ch. 1: closed-form binodal; Tc = Omega/2R
    expectClose(gapLow(800, 21000 as any), regularBinodal(21000, 800).x, 1e-12, 'GAPLOW(800, 21000)');
    expectClose(tCrit(21000 as any), 21000 / (2 * R), CRIT, 'TCRIT(21000)');
    expectClose(gapLow(800, [[21000]]), regularBinodal(21000, 800).x, 1e-12, 'GAPLOW(800, {21000})');
  });

  it('a numeric range is rows a, b, c of L_k; missing columns and trailing empty rows are zero/ignored', () => {
    const terms = [{ a: 21000, b: -2, c: 0 }, { a: 2000, b: 0, c: 0 }];
    const map = phaseMap(redlichKister(terms).at(700));
    expectClose(gapLow(700, [[21000, -2, 0], [2000, 0, 0]]), map.gaps[0].low.x, SOLVE, 'full rows');
    expectClose(gapLow(700, [[21000, -2], [2000, null], [null, null]] as any), map.gaps[0].low.x, SOLVE, 'short rows');
    expectClose(gMix(0.3, 700, [[21000, -2, 0], [2000, 0, 0]]), redlichKister(terms).at(700).g(0.3, 0.7), 0, 'GMIX in J/mol', 0);
  });

  it('a range holding text in its first column is a card, not Redlich–Kister rows', () => {
    // a regular card and the bare number give the same solve
    expect(gapLow(800, [['model', 'regular'], ['omega', 21000]] as any)).toBe(gapLow(800, 21000 as any));
  });
});

describe('Flory–Huggins closed forms through the cell functions', () => {
  // Flory, Principles of Polymer Chemistry (1953), ch. XIII; Rubinstein & Colby, Polymer Physics (2003), ch. 4:
  //   chi_c = (1/2)(N_A^-1/2 + N_B^-1/2)^2,  phi_c = sqrt(N_A)/(sqrt(N_A) + sqrt(N_B))
  // and the spinodal 1/(N_B phi) + 1/(N_A (1 - phi)) = 2 chi (phi = volume fraction of B).
  // With chi = chi.A + chi.B/T (spec), Tc = chi.B/(chi_c - chi.A).
  const chiC = (NA: number, NB: number) => 0.5 * (1 / Math.sqrt(NA) + 1 / Math.sqrt(NB)) ** 2;
  const phiC = (NA: number, NB: number) => Math.sqrt(NA) / (Math.sqrt(NA) + Math.sqrt(NB));
  /** Roots of 2 chi NA NB phi^2 + (NB - NA - 2 chi NA NB) phi + NA = 0 (the spinodal condition times NA NB phi (1-phi)). */
  const spinodal = (NA: number, NB: number, chi: number) => {
    const a = 2 * chi * NA * NB, b = NB - NA - 2 * chi * NA * NB, c = NA;
    const q = -0.5 * (b + Math.sign(b) * Math.sqrt(b * b - 4 * a * c));
    return [q / a, c / q].sort((u, v) => u - v);
  };
  const cases = [
    { name: 'symmetric blend, N_A = N_B = 100', NA: 100, NB: 100, chiA: -0.01, chiB: 15 },
    { name: 'polymer (N = 1000) in a solvent', NA: 1, NB: 1000, chiA: 0.2, chiB: 150 },
  ];
  for (const { name, NA, NB, chiA, chiB } of cases) {
    it(name, () => {
      const card = [['model', 'flory-huggins'], ['NA', NA], ['NB', NB], ['chi.A', chiA], ['chi.B', chiB]];
      const Tc = chiB / (chiC(NA, NB) - chiA);
      expect(critCount(card as any)).toBe(1);
      expect(critKind(card as any)).toBe('upper');
      expectClose(tCrit(card as any), Tc, CRIT, 'TCRIT');
      expectClose(xCrit(card as any), phiC(NA, NB), CRIT, 'XCRIT');
      // the same through a °C card
      expectClose(tCrit([...card, ['temperature', '°C']] as any) + 273.15, Tc, CRIT, 'TCRIT (°C)');
      // spinodal 10 % below Tc: simple roots of a quadratic, solved to rounding by the core; the
      // quadratic's roots here are well separated (cancellation-free form): 1e-10 relative.
      const T = 0.9 * Tc;
      const [s1, s2] = spinodal(NA, NB, chiA + chiB / T);
      expectClose(spinLow(T, card as any), s1, 1e-10, 'SPINLOW');
      expectClose(spinHigh(T, card as any), s2, 1e-10, 'SPINHIGH');
      // a symmetric blend's gap is symmetric about 1/2
      if (NA === NB) expectClose(gapLow(T, card as any) + gapHigh(T, card as any), 1, 0, 'x\' + x\'\'', 1e-12);
    });
  }
});
