/**
 * A solve gives the same bits from any start: phaseMap with a hint from another temperature,
 * continueMap from the previous row and a gap table all equal phaseMap from scratch, bit for bit
 * (toEqual on doubles is exact). Systems invented for the test.
 */
import { describe, expect, it } from 'vitest';
import { continueMap, phaseMap } from '../../src/core/binodal';
import { criticalPoints } from '../../src/core/critical';
import { evenTemperatures, gapTable } from '../../src/core/gapTable';
import type { BinaryModel } from '../../src/core/model';
import { floryHuggins } from '../../src/core/models/floryHuggins';
import { nrtl } from '../../src/core/models/nrtl';
import { redlichKister } from '../../src/core/models/redlichKister';

const SYSTEMS: Array<[string, BinaryModel, number, number]> = [
  ['Redlich–Kister, 3 terms', redlichKister([{ a: 20000, b: -2, c: 0 }, { a: 3000, b: 0, c: 0 }, { a: 1500, b: 0, c: 0 }]), 500, 900],
  ['Redlich–Kister, two gaps', redlichKister([{ a: -5000, b: 0, c: 0 }, { a: 0, b: 0, c: 0 }, { a: 60000, b: 0, c: 0 }]), 300, 1500],
  ['Flory–Huggins', floryHuggins({ NA: 200, NB: 500, A: -0.002, B: 3.5 }), 300, 380],
  ['NRTL', nrtl({ a12: 0, b12: 800, a21: 0, b21: 1200, alpha: 0.2 }), 300, 700],
];

describe('the same bits from any start', () => {
  for (const [name, model, T1, T2] of SYSTEMS) {
    it(name, () => {
      const Ts = evenTemperatures(T1, T2, 120);
      const cold = Ts.map((T) => phaseMap(model.at(T)));
      let continued = 0;
      for (let i = 1; i < Ts.length; i++) {
        const iso = model.at(Ts[i]);
        // hints from the row before, from five rows back and from the far end of the range
        for (const hint of [cold[i - 1], cold[Math.max(0, i - 5)], cold[Ts.length - 1]]) expect(phaseMap(iso, hint), `T = ${Ts[i]}`).toEqual(cold[i]);
        const next = continueMap(iso, cold[i - 1]);
        if (next) { continued++; expect(next, `continueMap at T = ${Ts[i]}`).toEqual(cold[i]); }
      }
      // continueMap follows one gap over one unstable interval; with two gaps the caller solves from scratch
      if (name !== 'Redlich–Kister, two gaps') expect(continued, 'continueMap answered most rows').toBeGreaterThan(Ts.length / 2);
      const table = gapTable(model, Ts, 1, criticalPoints(model));
      table.forEach((row, i) => {
        const gap = cold[i].gaps[0];
        if (row.critical) return; // a critical row holds the critical point, not a solve
        expect([row.low, row.high], `gap table row at T = ${row.T}`).toEqual(gap ? [gap.low.x, gap.high.x] : [NaN, NaN]);
      });
    });
  }
});
