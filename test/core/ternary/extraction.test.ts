/**
 * Extraction stages: component balances over each stage (the mixing and lever rules; Treybal,
 * Liquid Extraction, 2nd ed. (1963) ch. 6, from memory), equilibrium between extract and raffinate,
 * and cross-current stages stripping the solute stage by stage.
 */
import { describe, expect, it } from 'vitest';
import { cascade, CASCADE_TOL, counterCurrent, crossCurrent, extractionStage, stagesFor, type Stream } from '../../../src/core/ternary/extraction';
import { MixgapError } from '../../../src/core/errors';
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

  it('N stages: every stage and the cascade balance to 1e-12 of each component\'s inflow, and more stages leave less solute', () => {
    // the solver stops when the assumed and computed streams agree to CASCADE_TOL (1e-13) of each
    // component's inflow, and a stage's split closes its own balance to rounding (~1e-16 of its
    // flows): 1e-12 of the inflow is the promise, with room for rounding over up to 20 stages
    expect(CASCADE_TOL).toBeLessThanOrEqual(1e-13);
    let last = Infinity;
    for (const N of [2, 4, 10, 20]) {
      const cc = counterCurrent(model, T, feed, solvent, N);
      for (const key of ['xA', 'xB', 'xC'] as const) {
        const into = feed.amount * feed.x[key] + solvent.amount * solvent.x[key];
        const out = cc.extract.amount * cc.extract.x[key] + cc.raffinate.amount * cc.raffinate.x[key];
        expect(Math.abs(out - into), `N = ${N}, ${key}`).toBeLessThan(1e-12 * into);
      }
      // each stage: what enters (raffinate from the left, extract from the right) leaves
      cc.stages.forEach((st, n) => {
        const inL = n === 0 ? feed : cc.stages[n - 1].raffinate, inR = n === N - 1 ? solvent : cc.stages[n + 1].extract;
        for (const key of ['xA', 'xB', 'xC'] as const) {
          const into = feed.amount * feed.x[key] + solvent.amount * solvent.x[key];
          const d = inL.amount * inL.x[key] + inR.amount * inR.x[key] - st.extract.amount * st.extract.x[key] - st.raffinate.amount * st.raffinate.x[key];
          expect(Math.abs(d), `N = ${N}, stage ${n + 1}, ${key}`).toBeLessThan(1e-12 * into); // as for the cascade
        }
      });
      const left = cc.raffinate.amount * cc.raffinate.x.xB;
      expect(left).toBeLessThan(last);
      last = left;
      // counter-current beats cross-current with the same total solvent in equal parts (Treybal,
      // Liquid Extraction, 2nd ed. (1963) ch. 6, from memory); with many stages the small solvent
      // portions would dissolve in the raffinate (one phase), so only for few stages
      if (N > 4) continue;
      const cross = crossCurrent(model, T, feed, solvent.x, Array(N).fill(solvent.amount / N));
      const crossLeft = cross[N - 1].raffinate.amount * cross[N - 1].raffinate.x.xB;
      expect(left).toBeLessThan(crossLeft);
    }
  });

  it('every stage is an equilibrium stage: extract and raffinate have equal chemical potentials', () => {
    const cc = counterCurrent(model, T, feed, solvent, 6);
    const iso = model.at(T), e = new Float64Array(LOCAL_SIZE), r = new Float64Array(LOCAL_SIZE);
    for (const st of cc.stages) {
      iso.local(st.extract.x.xA, st.extract.x.xB, st.extract.x.xC, e);
      iso.local(st.raffinate.x.xA, st.raffinate.x.xB, st.raffinate.x.xC, r);
      // the split's Newton tolerance, 1e-9 RT (as for one stage above)
      for (let i = 0; i < 3; i++) expect(Math.abs(e[MUA + i] - r[MUA + i])).toBeLessThan(1e-9 * (RT + Math.abs(e[MUA + i])));
    }
  });

  it('refuses a stage count that is not a whole number from 1 to 100', () => {
    expect(failureReason(() => counterCurrent(model, T, feed, solvent, 0))).toBe('range');
    expect(failureReason(() => counterCurrent(model, T, feed, solvent, 2.5))).toBe('range');
  });
});

describe('solute recovery and the stages for a target', () => {
  it('recovery rises with the number of stages, stays below 1, and equals the extract\'s solute over the feed\'s', () => {
    let last = 0;
    for (let N = 1; N <= 8; N++) {
      const r = cascade(model, T, feed, solvent, N, 1);
      expect(r.recovery, `N = ${N}`).toBeGreaterThan(last);
      // the definition, computed the same way: equal bits
      expect(r.recovery).toBe((r.extract.amount * r.extract.x.xB) / (feed.amount * feed.x.xB));
      last = r.recovery;
    }
    expect(last).toBeLessThan(1);
  });

  it('a solute that (all but) does not enter the solvent phase: recovery zero', () => {
    // B repelled by the solvent C (L_BC = 40 RT): K_B = x_B''/x_B' ~ exp((L_AB - L_BC)/RT) ~ 1e-17
    // at infinite dilution (Redlich & Kister, Ind. Eng. Chem. 40 (1948) 345: ln gamma_inf = L0/RT
    // for one term). A model's solubility is never exactly zero; to double precision against a
    // recovery of order 1 it is: below 1e-15.
    const repelled = ternaryRedlichKister({ AB: [term(1.2)], AC: [term(3.4)], BC: [term(40)] });
    for (const N of [1, 3]) {
      const r = cascade(repelled, T, { amount: 100, x: { xA: 0.9, xB: 0.1, xC: 0 } }, solvent, N, 1).recovery;
      expect(r).toBeGreaterThanOrEqual(0);
      expect(r).toBeLessThan(1e-15);
    }
  });

  it('Kremser: immiscible carrier and solvent, a dilute solute with a constant distribution coefficient', () => {
    // Kremser, Natl. Petroleum News 22 (1930) 43; Treybal, Mass-Transfer Operations, 3rd ed. (1980)
    // ch. 10 (from memory): with solute-free carrier F' and solvent S', K = Y/X constant and a
    // solute-free solvent, the unrecovered share after N ideal stages is
    //   (eps - 1) / (eps^(N+1) - 1),  eps = K S'/F'.
    // Here A and C barely mix (L_AC = 14 RT: mutual solubility ~ e^-14 ~ 8e-7) and the solute is
    // dilute (x_B = 1e-6), so K = exp((L_AB - L_BC)/RT) = e (Redlich & Kister 1948, ln gamma_inf =
    // L0/RT); both perturb eps by a few 1e-6, which the unrecovered share carries up to N + 1 fold:
    // 2e-5 of it is the tolerance.
    const k = ternaryRedlichKister({ AB: [term(2)], AC: [term(14)], BC: [term(1)] });
    const xB = 1e-6, dilute = { amount: 1, x: { xA: 1 - xB, xB, xC: 0 } };
    for (const ratio of [0.5, 0.25]) {
      const eps = (Math.E * ratio) / (1 - xB);
      for (let N = 1; N <= 6; N++) {
        const r = cascade(k, T, dilute, { amount: ratio, x: { xA: 0, xB: 0, xC: 1 } }, N, 1).recovery;
        const phi = (eps - 1) / (eps ** (N + 1) - 1);
        expect(Math.abs(1 - r - phi) / phi, `S/F = ${ratio}, N = ${N}`).toBeLessThan(2e-5);
      }
    }
  });

  it('the inverse: a whole count\'s own recovery gives that count; between counts, a real number between them', () => {
    const r = [0];
    for (let N = 1; N <= 4; N++) r.push(cascade(model, T, feed, solvent, N, 1).recovery);
    for (let N = 1; N <= 4; N++) expect(stagesFor(model, T, feed, solvent, 1, r[N]).stages).toBe(N);
    // geometric interpolation of 1 - r between 2 and 3 stages (the documented rule, written out)
    const target = (r[2] + r[3]) / 2;
    const want = 2 + Math.log((1 - r[2]) / (1 - target)) / Math.log((1 - r[2]) / (1 - r[3]));
    const got = stagesFor(model, T, feed, solvent, 1, target).stages;
    expect(got).toBeGreaterThan(2);
    expect(got).toBeLessThan(3);
    // the same arithmetic on the same recoveries: to rounding
    expect(got).toBeCloseTo(want, 12);
    // below one stage's recovery, between 0 and 1 stages (r_0 = 0)
    const below = stagesFor(model, T, feed, solvent, 1, r[1] / 2).stages;
    expect(below).toBeGreaterThan(0);
    expect(below).toBeLessThan(1);
  });

  it('a target the cascade cannot reach is \'none\', naming the recovery it reaches', () => {
    // the Kremser system with eps = e/4 < 1: the recovery tends to eps ~ 0.68 however many stages
    const k = ternaryRedlichKister({ AB: [term(2)], AC: [term(14)], BC: [term(1)] });
    const dilute = { amount: 1, x: { xA: 1 - 1e-6, xB: 1e-6, xC: 0 } }, lean: Stream = { amount: 0.25, x: { xA: 0, xB: 0, xC: 1 } };
    let error: unknown;
    try { stagesFor(k, T, dilute, lean, 1, 0.9, 12); } catch (e) { error = e; }
    expect(error).toBeInstanceOf(MixgapError);
    expect((error as MixgapError).reason).toBe('none');
    // the recovery named is that of the stage count named (where the search stopped)
    const text = (error as MixgapError).message;
    const m = /it reaches ([\d.e-]+) with (\d+) stages/.exec(text) ?? /up to (\d+) stages: it reaches ([\d.e-]+)/.exec(text);
    expect(m, text).not.toBeNull();
    const [r, N] = m![0].startsWith('it') ? [Number(m![1]), Number(m![2])] : [Number(m![2]), Number(m![1])];
    expect(r).toBe(cascade(k, T, dilute, lean, N, 1).recovery);
    // Kremser's limit for eps < 1 is eps = e/4: the recovery named lies below it
    expect(r).toBeLessThan(Math.E / 4);
    expect(failureReason(() => stagesFor(model, T, feed, solvent, 1, 1))).toBe('range');
    expect(failureReason(() => cascade(model, T, feed, solvent, 3, 2))).toBe('range'); // no C in the feed
  });
});
