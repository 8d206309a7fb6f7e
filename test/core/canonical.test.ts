/**
 * A solve gives the same bits from any start: phaseMap with a hint from another temperature,
 * continueMap from the previous row and a gap table all equal phaseMap from scratch, bit for bit
 * (toEqual on doubles is exact); and the gap's final solve (canonicalGap, the guarded-cell rule of
 * src/core/roots.ts) gives the same bits from estimates in different cells, on both sides of a cell
 * boundary, also for a gap whose boundary lies next to a cell boundary (where the side is decided
 * by a sign test). Systems invented for the test.
 */
import { describe, expect, it } from 'vitest';
import { canonicalGap, continueMap, convexBranches, phaseMap, type Gap } from '../../src/core/binodal';
import { CELL, CELL_GUARD } from '../../src/core/limits';
import { clearCell } from '../../src/core/roots';
import { criticalPoints, criticalSearch } from '../../src/core/critical';
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
      // a table follows its rows without maps (followTrack): the four columns are phaseMap's from
      // scratch, on this grid and on a grid five times denser (three earlier rows then start each)
      const critical = criticalPoints(model);
      const rowOf = (T: number) => {
        const map = phaseMap(model.at(T)), gap = map.gaps[0];
        if (!gap) return [NaN, NaN, NaN, NaN];
        const inside = map.spinodal.map((p) => p.x).filter((x) => x > gap.low.x && x < gap.high.x);
        return [gap.low.x, gap.high.x, inside.length ? Math.min(...inside) : NaN, inside.length ? Math.max(...inside) : NaN];
      };
      for (const grid of [Ts, evenTemperatures(T1, T2, 600)]) {
        for (const row of gapTable(model, grid, 1, critical)) {
          if (row.critical) continue; // a critical row holds the critical point, not a solve
          expect([row.low, row.high, row.spinLow, row.spinHigh], `gap table row at T = ${row.T}`).toEqual(rowOf(row.T));
        }
      }
    });
  }
});

/**
 * A stable island opening inside an unstable interval (near 789.5 K here: a local maximum of q rises
 * through zero, no gap closes, so no critical point is listed), after which the gap splits in two at
 * a three-phase temperature (near 887.5 K). A table must not follow its rows across the island as if
 * nothing changed: every row, for gap 1 and gap 2, both directions, is phaseMap's from scratch.
 * Invented parameters (found by a randomized comparison of tables with per-temperature solves).
 */
describe('a table across a stable island inside the unstable interval', () => {
  const model = redlichKister([{ a: 19116.377, b: 0, c: 0 }, { a: -704.834, b: 0, c: 0 }, { a: 5933.981, b: 0, c: 0 }]);
  it('every row is phaseMap from scratch, gaps 1 and 2', () => {
    const { points: critical, crossings } = criticalSearch(model);
    // the crossings a table is not followed across include every critical temperature
    for (const c of critical) expect(crossings, `Tc = ${c.T}`).toContain(c.T);
    expect(phaseMap(model.at(789)).spinodal.length, 'one unstable interval below the island').toBe(2);
    expect(phaseMap(model.at(790)).spinodal.length, 'two above it').toBe(4);
    expect(phaseMap(model.at(895)).gaps.length, 'two gaps after the split').toBe(2);
    for (const grid of [evenTemperatures(700, 950, 251), evenTemperatures(950, 700, 251)]) {
      for (const n of [1, 2]) {
        for (const row of gapTable(model, grid, n, critical, crossings)) {
          if (row.critical) continue;
          const map = phaseMap(model.at(row.T)), gap = map.gaps[n - 1];
          const inside = gap ? map.spinodal.map((p) => p.x).filter((x) => x > gap.low.x && x < gap.high.x) : [];
          const expected = gap ? [gap.low.x, gap.high.x, inside.length ? Math.min(...inside) : NaN, inside.length ? Math.max(...inside) : NaN] : [NaN, NaN, NaN, NaN];
          expect([row.low, row.high, row.spinLow, row.spinHigh], `gap ${n} at T = ${row.T}`).toEqual(expected);
        }
      }
    }
  });
});

describe('the gap\'s final solve from estimates in different cells', () => {
  const model = SYSTEMS[0][1];
  const at = (T: number) => {
    const iso = model.at(T);
    const map = phaseMap(iso);
    const [j, k] = convexBranches(iso, map.spinodal);
    return { iso, gap: map.gaps[0], j, k };
  };
  /** The bits of canonicalGap from estimates (d1, d2) away from the gap's own (u', u''). */
  const fromEstimates = (T: number, offsets: Array<[number, number]>) => {
    const { iso, gap, j, k } = at(T);
    return { gap, results: offsets.map(([d1, d2]) => canonicalGap(iso, j, k, gap.low.u + d1, gap.high.u + d2)) };
  };
  // estimates a few cells off, 1e-4 off (several cells: the first solve only finds the cell), and one ulp-scale apart
  const OFFSETS: Array<[number, number]> = [[0, 0], [3 * CELL, -2 * CELL], [-1e-4, 1e-4], [-5 * CELL, 0], [0, 7 * CELL], [1e-13, -1e-13]];

  it('the same bits from estimates in other cells', () => {
    for (const T of [520, 613.7, 780, 899]) {
      const { gap, results } = fromEstimates(T, OFFSETS);
      for (const r of results) expect(r, `T = ${T}`).toEqual(gap);
    }
  });

  /** A temperature at which the gap's boundary `which` lies `offset` from a cell boundary (secant on T). */
  function placed(which: 'low' | 'high', offset: number): { T: number; b: number } {
    let T0 = 700, T1 = 700.01;
    const u = (T: number) => at(T).gap[which].u;
    const b = Math.round(u(T0) / CELL) * CELL + offset;
    let f0 = u(T0) - b, f1 = u(T1) - b;
    for (let i = 0; i < 30 && f1 !== 0 && Math.abs(f1) > 1e-13; i++) {
      const T2 = T1 - (f1 * (T1 - T0)) / (f1 - f0);
      T0 = T1; f0 = f1; T1 = T2; f1 = u(T1) - b;
    }
    return { T: T1, b: b - offset };
  }

  for (const which of ['low', 'high'] as const) {
    for (const offset of [0, 1e-11, -1e-11, CELL_GUARD / 2, -CELL_GUARD / 2]) {
      it(`a gap whose ${which} boundary lies ${offset} from a cell boundary: estimates on both sides of it agree`, () => {
        const { T, b } = placed(which, offset);
        const { iso, gap, j, k } = at(T);
        // placed within the guard of b (the secant on T stops within 1e-13 of its target, far inside 1.5e-8)
        expect(Math.abs(gap[which].u - b)).toBeLessThan(CELL_GUARD);
        expect(clearCell(gap[which].u), 'the side of b was decided by the sign test').toBeNaN();
        // estimates just below and just above the boundary b (in the two cells it separates), and farther
        const sides = [-1e-12, 1e-12, -0.5 * CELL, 0.5 * CELL, -3 * CELL, 3 * CELL];
        for (const d of sides) {
          const e1 = which === 'low' ? b + d : gap.low.u, e2 = which === 'high' ? b + d : gap.high.u;
          const r = canonicalGap(iso, j, k, e1, e2) as Gap;
          expect(r, `estimate ${d} from the boundary at T = ${T}`).toEqual(gap);
        }
        // and it is the common tangent: g'(x') = g'(x''), mu_A(x') = mu_A(x'') to the rounding of
        // terms of a few RT (about 1e-16 RT each), with a margin of 1000
        const d1 = iso.dg(gap.low.x, gap.low.y), d2 = iso.dg(gap.high.x, gap.high.y);
        expect(Math.abs(d1 - d2)).toBeLessThan(1e-12 * iso.RT);
        const mu1 = iso.g(gap.low.x, gap.low.y) - gap.low.x * d1, mu2 = iso.g(gap.high.x, gap.high.y) - gap.high.x * d2;
        expect(Math.abs(mu1 - mu2)).toBeLessThan(1e-12 * iso.RT);
      });
    }
  }
});
