/**
 * Extraction stages: component balances over each stage (the mixing and lever rules; Treybal,
 * Liquid Extraction, 2nd ed. (1963) ch. 6, from memory), equilibrium between extract and raffinate,
 * and cross-current stages stripping the solute stage by stage.
 */
import { describe, expect, it } from 'vitest';
import { counterCurrent, crossCurrent, extractionStage } from '../../../src/core/ternary/extraction';
import { LOCAL_SIZE, MUA } from '../../../src/core/ternary/model';
import { ternaryRedlichKister } from '../../../src/core/ternary/redlichKister';
import { failureReason } from '../support/compare';
import { R_SPEC } from '../support/spec';

const T = 298.15, RT = R_SPEC * T;
const term = (w: number) => ({ a: w * RT, b: 0, c: 0 });
// Invented: carrier A and solvent C nearly immiscible, solute B miscible with both, a little more
// at home in C.
const model = ternaryRedlichKister({ AB: [term(1.2)], AC: [term(3.4)], BC: [term(0.4)] });
const feed = { amount: 100, x: { xA: 0.8, xB: 0.2, xC: 0 } };
const solvent = { amount: 80, x: { xA: 0, xB: 0, xC: 1 } };

describe('extraction stages', () => {
  it('one stage: balances close, extract and raffinate are in equilibrium, the extract is C-rich', () => {
    const st = extractionStage(model, T, feed, solvent);
    // total and component balances: rounding of a few products of size 100 mol, 1e-12 mol
    expect(Math.abs(st.extract.amount + st.raffinate.amount - 180)).toBeLessThan(1e-12 * 180);
    for (const key of ['xA', 'xB', 'xC'] as const) {
      const into = feed.amount * feed.x[key] + solvent.amount * solvent.x[key];
      const out = st.extract.amount * st.extract.x[key] + st.raffinate.amount * st.raffinate.x[key];
      expect(Math.abs(out - into), key).toBeLessThan(1e-10);
    }
    expect(st.extract.x.xC).toBeGreaterThan(st.raffinate.x.xC);
    const iso = model.at(T), e = new Float64Array(LOCAL_SIZE), r = new Float64Array(LOCAL_SIZE);
    iso.local(st.extract.x.xA, st.extract.x.xB, st.extract.x.xC, e);
    iso.local(st.raffinate.x.xA, st.raffinate.x.xB, st.raffinate.x.xC, r);
    // equal mu to the split's Newton tolerance (1e-9 RT)
    for (let i = 0; i < 3; i++) expect(Math.abs(e[MUA + i] - r[MUA + i])).toBeLessThan(1e-9 * (RT + Math.abs(e[MUA + i])));
  });

  it('cross-current: the solute left in the raffinate falls stage by stage; the solute balance closes over all stages', () => {
    const stages = crossCurrent(model, T, feed, solvent.x, [30, 30, 30]);
    expect(stages.length).toBe(3);
    const soluteIn = feed.amount * feed.x.xB;
    let extracted = 0, last = soluteIn;
    for (const s of stages) {
      const left = s.raffinate.amount * s.raffinate.x.xB;
      expect(left).toBeLessThan(last);
      last = left;
      extracted += s.extract.amount * s.extract.x.xB;
    }
    // rounding over three stages, 1e-10 mol of 20 mol
    expect(Math.abs(extracted + last - soluteIn)).toBeLessThan(1e-10);
  });

  it('says what is wrong: one phase, a mixture on an edge, bad amounts', () => {
    // B is miscible with both A and C: a feed rich in B with a little solvent stays one phase
    expect(failureReason(() => extractionStage(model, T, { amount: 100, x: { xA: 0.1, xB: 0.9, xC: 0 } }, { amount: 5, x: { xA: 0, xB: 0, xC: 1 } }))).toBe('none');
    expect(failureReason(() => extractionStage(model, T, { amount: 100, x: { xA: 1, xB: 0, xC: 0 } }, solvent))).toBe('range');
    expect(failureReason(() => extractionStage(model, T, { ...feed, amount: 0 }, solvent))).toBe('range');
    expect(failureReason(() => crossCurrent(model, T, feed, solvent.x, []))).toBe('range');
  });
});

describe('counter-current extraction', () => {
  it('one stage is the single equilibrium stage', () => {
    const cc = counterCurrent(model, T, feed, solvent, 1), st = extractionStage(model, T, feed, solvent);
    // the same computation: identical numbers
    expect(cc.extract).toEqual(st.extract);
    expect(cc.raffinate).toEqual(st.raffinate);
  });

  it('N stages: every stage balances, the cascade balances, and more stages leave less solute', () => {
    let last = Infinity;
    for (const N of [2, 4]) {
      const cc = counterCurrent(model, T, feed, solvent, N);
      for (const key of ['xA', 'xB', 'xC'] as const) {
        const into = feed.amount * feed.x[key] + solvent.amount * solvent.x[key];
        const out = cc.extract.amount * cc.extract.x[key] + cc.raffinate.amount * cc.raffinate.x[key];
        // the sweeps stop at a relative 1e-12 change, so the balance over the cascade closes to
        // about 1e-12 of the flows (~100 mol): 1e-9 mol
        expect(Math.abs(out - into), `N = ${N}, ${key}`).toBeLessThan(1e-9);
      }
      // each stage: what enters (raffinate from the left, extract from the right) leaves
      cc.stages.forEach((st, n) => {
        const inL = n === 0 ? feed : cc.stages[n - 1].raffinate, inR = n === N - 1 ? solvent : cc.stages[n + 1].extract;
        for (const key of ['xA', 'xB', 'xC'] as const) {
          const d = inL.amount * inL.x[key] + inR.amount * inR.x[key] - st.extract.amount * st.extract.x[key] - st.raffinate.amount * st.raffinate.x[key];
          expect(Math.abs(d), `N = ${N}, stage ${n + 1}, ${key}`).toBeLessThan(1e-9); // as for the cascade
        }
      });
      const left = cc.raffinate.amount * cc.raffinate.x.xB;
      expect(left).toBeLessThan(last);
      last = left;
      // counter-current beats cross-current with the same total solvent in equal parts (Treybal,
      // Liquid Extraction, 2nd ed. (1963) ch. 6, from memory)
      const cross = crossCurrent(model, T, feed, solvent.x, Array(N).fill(solvent.amount / N));
      const crossLeft = cross[N - 1].raffinate.amount * cross[N - 1].raffinate.x.xB;
      expect(left).toBeLessThan(crossLeft);
    }
  });

  it('refuses a stage count that is not a whole number from 1 to 100', () => {
    expect(failureReason(() => counterCurrent(model, T, feed, solvent, 0))).toBe('range');
    expect(failureReason(() => counterCurrent(model, T, feed, solvent, 2.5))).toBe('range');
  });
});
