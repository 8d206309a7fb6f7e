/**
 * gapTemperature: the regular-solution binodal read the other way (T from x0), round trips through
 * phaseMap for several model families, a closed loop, and failures.
 */
import { describe, expect, it } from 'vitest';
import { phaseMap } from '../../src/core/binodal';
import { criticalPoints } from '../../src/core/critical';
import { gapTemperature } from '../../src/core/gapTemperature';
import type { BinaryModel } from '../../src/core/model';
import { floryHuggins } from '../../src/core/models/floryHuggins';
import { nrtl } from '../../src/core/models/nrtl';
import { redlichKister, regularSolution } from '../../src/core/models/redlichKister';
import { failureReason } from './support/compare';
import { bisect } from './support/roots';
import { R_SPEC, rkL, type RkTerm } from './support/spec';

const logit = (x: number) => Math.log(x) - Math.log1p(-x);

// The core bisects in T to 1e-13 relative; the closed forms below are evaluated to ~1e-15.
// 1e-9 relative leaves room for the conditioning of the boundary (dT/dx0 is finite away from the
// critical point) and is far below any real disagreement.
const REL = 1e-9;

describe('regular solution: T = Omega(2x0 - 1) / (R ln[x0/(1 - x0)])', () => {
  const omega = 20000;
  const model = regularSolution(omega);
  const critical = criticalPoints(model);
  for (const x0 of [1e-6, 0.02, 0.2, 0.4, 0.6, 0.95, 1 - 1e-6]) {
    it(`x0 = ${x0}`, () => {
      // Hillert, Phase Equilibria, Phase Diagrams and Phase Transformations, 2nd ed. (2008): regular-solution
      // binodal ln[x/(1-x)] = Omega(2x-1)/(RT), solved for T
      const want = (omega * (2 * x0 - 1)) / (R_SPEC * logit(x0));
      const got = gapTemperature(model, x0, critical);
      expect(Math.abs(got - want) / want).toBeLessThan(REL);
    });
  }

  it('x0 = 1/2 enters the gap at Tc = Omega/2R', () => {
    // Porter, Easterling & Sherif, Phase Transformations in Metals and Alloys, 3rd ed. (2009), ch. 1: Tc = Omega / 2R
    // (the limit of the closed form above as x0 -> 1/2)
    const Tc = omega / (2 * R_SPEC);
    let got = NaN;
    expect(failureReason(() => { got = gapTemperature(model, 0.5, critical); })).toBe('no error');
    expect(Math.abs(got - Tc) / Tc).toBeLessThan(REL);
  });
});

describe('round trip: the gap temperature of a boundary found at T is T', () => {
  const systems: Array<{ name: string; model: BinaryModel; Ts: number[] }> = [
    { name: 'RK, L0 = 20000, L1 = 6000', model: redlichKister([{ a: 20000, b: 0, c: 0 }, { a: 6000, b: 0, c: 0 }]), Ts: [500, 900, 1300] },
    {
      name: 'RK, four terms with T ln T',
      model: redlichKister([{ a: 30000, b: -10, c: 0.5 }, { a: 8000, b: 0, c: 0 }, { a: -2000, b: 1, c: 0 }, { a: 1500, b: 0, c: -0.2 }]),
      Ts: [400, 700, 1000],
    },
    { name: 'Flory–Huggins, polymer in solvent', model: floryHuggins({ NA: 1, NB: 1000, A: 0.2, B: 150 }), Ts: [300, 400, 445] },
    { name: 'NRTL, tau = b/T', model: nrtl({ a12: 0, b12: 800, a21: 0, b21: 400, alpha: 0.2 }), Ts: [300, 400, 500] },
  ];
  for (const { name, model, Ts } of systems) {
    it(name, () => {
      // spec: the gap temperature of x0 is the highest T at which x0 lies on a binodal; with one
      // upper critical point, each boundary composition at T lies on the binodal only at T.
      const critical = criticalPoints(model);
      expect(critical).toHaveLength(1);
      for (const T of Ts) {
        const [gap] = phaseMap(model.at(T)).gaps;
        expect(gap, `a gap at ${T} K`).toBeDefined();
        for (const x0 of [gap.low.x, gap.high.x]) {
          const got = gapTemperature(model, x0, critical);
          expect(Math.abs(got - T) / T, `x0 = ${x0} from ${T} K: got ${got}`).toBeLessThan(REL);
        }
      }
    });
  }
});

describe('closed loop: L0 = -30000 + 270 T - 30 T ln T J/mol', () => {
  const terms: RkTerm[] = [{ a: -30000, b: 270, c: -30 }];
  const model = redlichKister(terms);
  const critical = criticalPoints(model);
  for (const x0 of [0.05, 0.2, 0.35]) {
    it(`x0 = ${x0}: the upper branch of the loop`, () => {
      // Hillert (2008): regular-solution binodal ln[x/(1-x)] = Omega(2x-1)/(RT) with Omega = L0(T):
      // x0 lies on the binodal where L0(T)/(RT) = u/(2x0 - 1), u = ln[x0/(1-x0)]; of the two roots
      // (one on each side of the maximum of the concave f below), the gap temperature is the higher (spec).
      const k = logit(x0) / (2 * x0 - 1);
      const f = (T: number) => rkL(terms, T)[0] - k * R_SPEC * T;
      const Tpeak = Math.exp((240 - k * R_SPEC) / 30); // f'(T) = 270 - 30 ln T - 30 - kR = 0
      const want = bisect(f, Tpeak, 20000);
      const got = gapTemperature(model, x0, critical);
      expect(Math.abs(got - want) / want).toBeLessThan(REL);
    });
  }
});

describe('failures', () => {
  it('a composition outside (0, 1) is out of range', () => {
    const model = regularSolution(20000), critical = criticalPoints(model);
    for (const x0 of [0, 1, -0.1, 1.5, NaN]) expect(failureReason(() => gapTemperature(model, x0, critical))).toBe('range');
  });

  it('a system that never splits has no gap temperature', () => {
    const model = regularSolution(-5000);
    expect(failureReason(() => gapTemperature(model, 0.3, criticalPoints(model)))).toBe('none');
  });

  it('a composition still inside a gap at 20000 K is out of range', () => {
    // Tc = 1e6 / 2R ~ 60000 K: x0 = 1/2 is inside the gap at every temperature searched
    const model = regularSolution(1e6);
    expect(failureReason(() => gapTemperature(model, 0.5, criticalPoints(model)))).toBe('range');
  });
});
