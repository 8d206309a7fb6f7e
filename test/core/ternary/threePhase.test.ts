/**
 * Three-phase triangles at T: the symmetric system's triangle, none where no three phases coexist,
 * and equal chemical potentials at the vertices of each triangle found.
 */
import { describe, expect, it } from 'vitest';
import { LOCAL_SIZE, MUA } from '../../../src/core/ternary/model';
import { ternaryNrtl } from '../../../src/core/ternary/nrtl';
import { ternaryRedlichKister } from '../../../src/core/ternary/redlichKister';
import { splitFeed } from '../../../src/core/ternary/split';
import { threePhaseTriangles } from '../../../src/core/ternary/threePhase';
import { R_SPEC } from '../support/spec';

const T = 300, RT = R_SPEC * T;
const term = (w: number) => ({ a: w * RT, b: 0, c: 0 });

describe('three-phase triangles', () => {
  it('Omega/RT = 3.5 on every pair: one triangle, symmetric, with the phases of the centre feed', () => {
    // symmetry of g under permutations of A, B, C (regular-solution pairs; see split.test.ts)
    const model = ternaryRedlichKister({ AB: [term(3.5)], AC: [term(3.5)], BC: [term(3.5)] });
    const ts = threePhaseTriangles(model, T);
    expect(ts.length).toBe(1);
    const centre = splitFeed(model, T, 1 / 3, 1 / 3, 1 / 3);
    // the same Newton solve from other starting feeds: agreement to its convergence, 1e-9
    ts[0].phases.forEach((p, k) => expect(Math.hypot(p.xA - centre.phases[k].xA, p.xB - centre.phases[k].xB, p.xC - centre.phases[k].xC)).toBeLessThan(1e-9));
    const [a, b] = [ts[0].phases[0].xA, ts[0].phases[0].xB];
    expect(Math.abs(ts[0].phases[2].xC - a) / a).toBeLessThan(1e-9);
    expect(Math.abs(ts[0].phases[2].xA - b) / b).toBeLessThan(1e-9);
  });

  it('none when at most two phases coexist anywhere', () => {
    // one gap from the A–C edge only (invented numbers): a two-phase region and its plait point
    expect(threePhaseTriangles(ternaryRedlichKister({ AB: [term(1.0)], AC: [term(3.0)], BC: [term(0.5)] }), T)).toEqual([]);
  });

  it('NRTL with gaps on every edge: equal mu_A, mu_B, mu_C at the vertices of each triangle', () => {
    // invented parameters (as in split.test.ts)
    const model = ternaryNrtl({
      a12: 2.0, b12: 0, a21: 1.5, b21: 0, a13: 1.8, b13: 0, a31: 2.4, b31: 0, a23: 2.2, b23: 0, a32: 2.2, b32: 0,
      alpha12: 0.2, alpha13: 0.3, alpha23: 0.25,
    });
    const ts = threePhaseTriangles(model, T);
    expect(ts.length).toBeGreaterThan(0);
    const iso = model.at(T), o = new Float64Array(LOCAL_SIZE);
    for (const t of ts) {
      for (const p of t.phases) {
        iso.local(p.xA, p.xB, p.xC, o);
        // Newton stops at 1e-9 RT or better
        for (let i = 0; i < 3; i++) expect(Math.abs(o[MUA + i] - t.mu[i])).toBeLessThan(1e-9 * (RT + Math.abs(t.mu[i])));
      }
    }
  });
});
