/** The shared solve memory: same answers as the solvers, and the failure reasons of the spec's cases. */
import { describe, expect, it } from 'vitest';
import { phaseMap } from '../../src/core/binodal';
import { criticalPoints } from '../../src/core/critical';
import { checkTemperature, criticalPointsOf, equilibriumAt, forgetSolves, gapAt, movedFrom, unstableAt } from '../../src/core/equilibrium';
import { redlichKister, regularSolution } from '../../src/core/models/redlichKister';
import { failureReason } from './support/compare';
import { regularBinodal, regularSpinodal } from './support/closedForms';
import { R_SPEC } from './support/spec';

describe('equilibriumAt and friends', () => {
  const omega = 20000, Tc = omega / (2 * R_SPEC);
  const model = regularSolution(omega);

  it('gapAt and unstableAt give the closed-form regular solution, whatever was solved before', () => {
    // Hillert (2008): regular-solution binodal and spinodal (see binodal.test.ts); a column of
    // temperatures solved in turn (each seeding the next) must give the same as each alone.
    forgetSolves();
    for (const T of [700, 720, 760, 900, 1100, 1000, 650]) {
      const b = regularBinodal(omega, T), s = regularSpinodal(omega, T);
      const gap = gapAt(model, T, 1);
      expect(Math.abs(gap.low.x - b.x) / b.x).toBeLessThan(1e-12); // rounding-limited, as in binodal.test.ts
      expect(Math.abs(gap.high.y - b.x) / b.x).toBeLessThan(1e-12);
      const [s1, s2] = unstableAt(model, T, 1);
      expect(Math.abs(s1 - s) / s).toBeLessThan(1e-12);
      expect(Math.abs(s2 - (1 - s)) / (1 - s)).toBeLessThan(1e-12);
    }
  });

  it('agrees with phaseMap and criticalPoints', () => {
    const m = redlichKister([{ a: -5000, b: 0, c: 0 }, { a: 0, b: 0, c: 0 }, { a: 60000, b: 0, c: 0 }]);
    expect(equilibriumAt(m, 600)).toEqual(phaseMap(m.at(600)));
    expect(criticalPointsOf(m)).toEqual(criticalPoints(m));
  });

  it('a moved model (movedFrom) gives the same bits whether or not its parent was solved first, and the closed form', () => {
    // Hillert (2008): regular-solution binodal (see binodal.test.ts); the parent's map only starts
    // the moved model's solve, so the answer must be the same bits as a solve from nothing.
    const mapBits = (m: ReturnType<typeof equilibriumAt>) => JSON.stringify([m.gaps.map((g) => [g.low.u, g.high.u, g.slope]), m.spinodal.map((p) => p.u)]);
    for (const d of [2, -150, 300, 1500]) {
      for (const T of [650, 800, 1000]) {
        forgetSolves();
        const alone = mapBits(equilibriumAt(regularSolution(omega + d), T));
        forgetSolves();
        const moved = regularSolution(omega + d);
        equilibriumAt(model, T);
        movedFrom(moved, model);
        const m = equilibriumAt(moved, T);
        expect(mapBits(m)).toBe(alone);
        expect(mapBits(m)).toBe(mapBits(phaseMap(moved.at(T))));
        const b = regularBinodal(omega + d, T);
        expect(Math.abs(m.gaps[0].low.x - b.x) / b.x).toBeLessThan(1e-12); // rounding-limited, as above
      }
    }
  });

  it('failure reasons', () => {
    // spec: no gap above Tc; gaps numbered from 1
    expect(failureReason(() => gapAt(model, Tc * 1.01))).toBe('none');
    expect(failureReason(() => unstableAt(model, Tc * 1.01))).toBe('none');
    expect(failureReason(() => gapAt(model, 800, 2))).toBe('range');
    expect(failureReason(() => gapAt(model, 800, 0))).toBe('range');
    expect(failureReason(() => unstableAt(model, 800, 2))).toBe('range');
    for (const T of [0, -10, NaN, Infinity]) expect(failureReason(() => checkTemperature(T))).toBe('range');
    expect(failureReason(() => equilibriumAt(model, 0))).toBe('range');
  });
});
