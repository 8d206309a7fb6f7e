/**
 * gapTable: rows of a regular solution against the closed forms, the critical row, rows above Tc,
 * and a table of the second of two gaps.
 */
import { describe, expect, it } from 'vitest';
import { phaseMap } from '../../src/core/binodal';
import { criticalPoints } from '../../src/core/critical';
import { evenTemperatures, gapTable } from '../../src/core/gapTable';
import { redlichKister, regularSolution } from '../../src/core/models/redlichKister';
import { regularBinodal, regularSpinodal } from './support/closedForms';
import { R_SPEC } from './support/spec';

describe('regular solution Omega = 20000 J/mol from 600 K to 1400 K, 9 rows', () => {
  const omega = 20000, Tc = omega / (2 * R_SPEC); // Porter, Easterling & Sherif (2009) ch. 1: Tc = Omega / 2R
  const model = regularSolution(omega);
  const table = gapTable(model, evenTemperatures(600, 1400, 9), 1, criticalPoints(model));

  it('temperatures evenly spaced, the one nearest Tc replaced by Tc', () => {
    expect(table).toHaveLength(9);
    // 1202.7 K is nearest to the grid temperature 1200 K (row 7)
    const want = [600, 700, 800, 900, 1000, 1100, Tc, 1300, 1400];
    // Tc from criticalPoints: resolved to ~1e-13 relative (see critical.test.ts); 1e-9 allowed
    table.forEach((row, i) => expect(Math.abs(row.T - want[i]) / want[i]).toBeLessThan(1e-9));
  });

  it('rows below Tc hold the closed-form binodal and spinodal', () => {
    // Hillert, Phase Equilibria, Phase Diagrams and Phase Transformations, 2nd ed. (2008): regular-solution
    // binodal ln[x/(1-x)] = Omega(2x-1)/(RT) and spinodal x(1-x) = RT/(2 Omega)
    for (const row of table.slice(0, 6)) {
      const b = regularBinodal(omega, row.T), s = regularSpinodal(omega, row.T);
      // well away from Tc (T <= 0.915 Tc): rounding-limited, 1e-12 relative as in binodal.test.ts
      expect(Math.abs(row.low - b.x) / b.x).toBeLessThan(1e-12);
      expect(Math.abs(row.high - (1 - b.x)) / (1 - b.x)).toBeLessThan(1e-12);
      expect(Math.abs(row.spinLow - s) / s).toBeLessThan(1e-12);
      expect(Math.abs(row.spinHigh - (1 - s)) / (1 - s)).toBeLessThan(1e-12);
    }
  });

  it('the critical row holds xc = 1/2 in all four columns', () => {
    const row = table[6];
    for (const v of [row.low, row.high, row.spinLow, row.spinHigh]) expect(Math.abs(v - 0.5)).toBeLessThan(1e-9);
  });

  it('rows above Tc are empty (NaN)', () => {
    for (const row of table.slice(7)) {
      for (const v of [row.low, row.high, row.spinLow, row.spinHigh]) expect(v).toBeNaN();
    }
  });

  it('the same temperatures in descending order give the same rows, reversed', () => {
    const down = gapTable(model, evenTemperatures(1400, 600, 9), 1, criticalPoints(model));
    down.reverse().forEach((row, i) => {
      const up = table[i];
      expect(row.T).toBeCloseTo(up.T, 9);
      for (const k of ['low', 'high', 'spinLow', 'spinHigh'] as const) {
        if (Number.isNaN(up[k])) expect(row[k]).toBeNaN();
        else expect(Math.abs(row[k] - up[k])).toBeLessThan(1e-12); // the same solve, from other starting points
      }
    });
  });
});

describe('two gaps: L0 = -5000, L2 = 60000 J/mol', () => {
  const model = redlichKister([{ a: -5000, b: 0, c: 0 }, { a: 0, b: 0, c: 0 }, { a: 60000, b: 0, c: 0 }]);
  const critical = criticalPoints(model);

  it('gap 2 of the table is the B-rich gap of phaseMap', () => {
    const table = gapTable(model, evenTemperatures(400, 800, 5), 2, critical);
    for (const row of table) {
      const map = phaseMap(model.at(row.T));
      expect(map.gaps).toHaveLength(2);
      // the same solve from other starting points: equal to rounding
      expect(Math.abs(row.low - map.gaps[1].low.x)).toBeLessThan(1e-12);
      expect(Math.abs(row.high - map.gaps[1].high.x)).toBeLessThan(1e-12);
      // spec: spinodal columns are the unstable interval inside that gap
      expect(Math.abs(row.spinLow - map.spinodal[2].x)).toBeLessThan(1e-12);
      expect(Math.abs(row.spinHigh - map.spinodal[3].x)).toBeLessThan(1e-12);
    }
  });

  it('a gap number that does not exist gives empty rows', () => {
    for (const row of gapTable(model, evenTemperatures(400, 800, 3), 3, critical)) expect(row.low).toBeNaN();
  });
});

describe('the first and last rows always keep T1 and T2 (issue: a critical row took the place of a requested row)', () => {
  // Regular solution: Tc = Omega/2R at xc = 1/2 (Porter, Easterling & Sherif (2009) ch. 1); with
  // a temperature-dependent Omega(T) = a + b T + c T ln T the same condition Omega(Tc) = 2 R Tc holds
  // at every critical point (spec closed form with Omega taken at Tc), solved here by bisection.
  const bisect = (f: (T: number) => number, lo: number, hi: number) => {
    for (let i = 0; i < 200; i++) {
      const mid = 0.5 * (lo + hi);
      if (Math.sign(f(mid)) === Math.sign(f(lo))) lo = mid; else hi = mid;
    }
    return 0.5 * (lo + hi);
  };

  it('700 K to 1300 K, 4 rows, Tc = 1262.86 K: 1300 K is nearer but stays; 1100 K gives way', () => {
    const omega = 21000, Tc = omega / (2 * R_SPEC);
    const model = regularSolution(omega);
    const table = gapTable(model, evenTemperatures(700, 1300, 4), 1, criticalPoints(model));
    const want = [700, 900, Tc, 1300];
    // Tc from criticalPoints: resolved to ~1e-13 relative (see critical.test.ts); 1e-9 allowed
    table.forEach((row, i) => expect(Math.abs(row.T - want[i]) / want[i], `row ${i}: ${row.T}`).toBeLessThan(1e-9));
    expect(table.map((r) => r.critical)).toEqual([false, false, true, false]);
    expect(table[0].T).toBe(700); // the end rows exactly as asked
    expect(table[3].T).toBe(1300);
  });

  it('two rows: no interior row, so no critical row, even with Tc between them', () => {
    const model = regularSolution(21000);
    const table = gapTable(model, [700, 1300], 1, criticalPoints(model));
    expect(table.map((r) => [r.T, r.critical])).toEqual([[700, false], [1300, false]]);
  });

  it('a closed loop: both critical temperatures lie next to an end row; each takes its own interior row', () => {
    // L0 = -30000 + 270 T - 30 T ln T J/mol (the README's closed loop): lower and upper critical points
    const terms = [{ a: -30000, b: 270, c: -30 }];
    const model = redlichKister(terms);
    const excess = (T: number) => terms[0].a + terms[0].b * T + terms[0].c * T * Math.log(T) - 2 * R_SPEC * T;
    const lower = bisect(excess, 100, 1000), upper = bisect(excess, 2000, 5000);
    const table = gapTable(model, evenTemperatures(400, 3500, 5), 1, criticalPoints(model));
    const want = [400, lower, 1950, upper, 3500];
    // critical temperatures from the core's search (~1e-13 relative) against bisection to the last
    // bit of the closed form: 1e-9 relative allowed
    table.forEach((row, i) => expect(Math.abs(row.T - want[i]) / want[i], `row ${i}: ${row.T}`).toBeLessThan(1e-9));
    expect(table.map((r) => r.critical)).toEqual([false, true, false, true, false]);
    // critical composition of a one-term (symmetric) series: xc = 1/2 (spec closed form); the
    // core's critical search resolves xc to ~1e-12 (critical.test.ts), 1e-9 allowed
    for (const row of [table[1], table[3]]) for (const v of [row.low, row.high, row.spinLow, row.spinHigh]) expect(Math.abs(v - 0.5)).toBeLessThan(1e-9);
  });
});
