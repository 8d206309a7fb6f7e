/**
 * The nonlinear fit (src/core/fit/nonlinear.ts), round trips: data computed by our own forward
 * functions (the common-tangent solver, the gap temperature, the critical-point search) from known
 * parameters must give those parameters back. That is a round-trip check of the fit against the
 * forward solvers, not an external reference (common practice, no published source). Then data
 * that cannot determine the parameters must fail with a named reason, never a number.
 */
import { describe, expect, it } from 'vitest';
import { phaseMap } from '../../../src/core/binodal';
import { criticalPoints } from '../../../src/core/critical';
import { MixgapError } from '../../../src/core/errors';
import type { ModelFamily } from '../../../src/core/family';
import { gapTemperature } from '../../../src/core/gapTemperature';
import type { Measurement } from '../../../src/core/fit/measurements';
import { fitModel, fitSystems } from '../../../src/core/fit/nonlinear';
import { buildModel, parameterUnit, type ParameterSpec } from '../../../src/core/fit/parameters';
import { floryHugginsFamily } from '../../../src/core/models/floryHuggins';
import { nrtlFamily } from '../../../src/core/models/nrtl';
import { redlichKisterFamily, regularFamily } from '../../../src/core/models/redlichKister';

type Values = Record<string, number>;

function tieLines(family: ModelFamily, truth: Values, Ts: number[]): Measurement[] {
  const model = buildModel(family, truth);
  return Ts.map((T) => {
    const g = phaseMap(model.at(T)).gaps[0];
    return { kind: 'tie-line', T, xLow: g.low.x, xHigh: g.high.x };
  });
}

function boundaries(family: ModelFamily, truth: Values, points: Array<[number, 'low' | 'high']>): Measurement[] {
  const model = buildModel(family, truth);
  return points.map(([T, side]) => ({ kind: 'boundary', T, x: phaseMap(model.at(T)).gaps[0][side].x, side }));
}

function cloudPoints(family: ModelFamily, truth: Values, xs: number[]): Measurement[] {
  const model = buildModel(family, truth);
  const critical = criticalPoints(model);
  return xs.map((x0) => ({ kind: 'cloud point', x0, T: gapTemperature(model, x0, critical) }));
}

function criticalPoint(family: ModelFamily, truth: Values, withX: boolean): Measurement {
  const c = criticalPoints(buildModel(family, truth))[0];
  return { kind: 'critical point', Tc: c.T, xc: withX ? c.x : undefined };
}

/** Free parameters (no start: the fit chooses) and fixed ones at their true values. */
function specs(truth: Values, free: string[]): ParameterSpec[] {
  return Object.entries(truth).map(([name, value]) => (free.includes(name) ? { name, free: true } : { name, value, free: false }));
}

function reason(f: () => unknown): string {
  try { f(); } catch (e) { return e instanceof MixgapError ? `${e.reason}: ${e.message}` : `other: ${String(e)}`; }
  return 'no error';
}

describe('round trip: parameters -> data (our forward solvers) -> parameters, every family and kind', () => {
  // The data carry the solvers' rounding: compositions to ~1e-15, gap and critical temperatures to
  // a relative 1e-13 (their bisection and Brent tolerances). The fit stops when a step is below
  // 1e-10 of a parameter's scale; with condition numbers below 1e4 (checked) the parameters come
  // back to 1e-7 of their scale (the unit of ./parameters.ts or the value itself) with margin.
  const cases: Array<{ name: string; family: ModelFamily; truth: Values; free: string[]; data: () => Measurement[] }> = [
    {
      name: 'regular solution, omega from tie-lines (linear start)',
      family: regularFamily, truth: { omega: 20000 }, free: ['omega'],
      data: () => tieLines(regularFamily, { omega: 20000 }, [700, 900, 1100]),
    },
    {
      name: 'Redlich–Kister L0, L0.b, L1 from single boundary points on both sides (grid start)',
      family: redlichKisterFamily, truth: { L0: 22000, 'L0.b': -4, L1: 3000 }, free: ['L0', 'L0.b', 'L1'],
      data: () => boundaries(redlichKisterFamily, { L0: 22000, 'L0.b': -4, L1: 3000 }, [[700, 'low'], [700, 'high'], [800, 'low'], [900, 'high'], [950, 'low']]),
    },
    {
      name: 'Flory–Huggins chi = A + B/T, chain lengths fixed (1, 50), from cloud points',
      family: floryHugginsFamily, truth: { NA: 1, NB: 50, 'chi.A': -0.2, 'chi.B': 300 }, free: ['chi.A', 'chi.B'],
      data: () => cloudPoints(floryHugginsFamily, { NA: 1, NB: 50, 'chi.A': -0.2, 'chi.B': 300 }, [0.04, 0.08, 0.16, 0.3]),
    },
    {
      name: 'NRTL a12, b12, a21, b21 (alpha fixed at 0.3) from mutual solubilities at four temperatures',
      family: nrtlFamily, truth: { a12: 1, b12: 300, a21: -0.5, b21: 900, alpha: 0.3 }, free: ['a12', 'b12', 'a21', 'b21'],
      data: () => tieLines(nrtlFamily, { a12: 1, b12: 300, a21: -0.5, b21: 900, alpha: 0.3 }, [290, 310, 330, 350]),
    },
    {
      name: 'Redlich–Kister L0, L1 from one critical point (Tc, xc): exactly determined',
      family: redlichKisterFamily, truth: { L0: 20000, L1: 2500 }, free: ['L0', 'L1'],
      data: () => [criticalPoint(redlichKisterFamily, { L0: 20000, L1: 2500 }, true)],
    },
    {
      name: 'Redlich–Kister L0, L0.b from a mix: a critical temperature, a cloud point and a boundary point',
      family: redlichKisterFamily, truth: { L0: 24000, 'L0.b': -5 }, free: ['L0', 'L0.b'],
      data: () => [
        criticalPoint(redlichKisterFamily, { L0: 24000, 'L0.b': -5 }, false),
        ...cloudPoints(redlichKisterFamily, { L0: 24000, 'L0.b': -5 }, [0.2]),
        ...boundaries(redlichKisterFamily, { L0: 24000, 'L0.b': -5 }, [[600, 'high']]),
      ],
    },
    {
      name: 'Flory–Huggins chi.A, chi.B from a critical point and tie-lines (NA = 1, NB = 20)',
      family: floryHugginsFamily, truth: { NA: 1, NB: 20, 'chi.A': 0.1, 'chi.B': 200 }, free: ['chi.A', 'chi.B'],
      data: () => [
        criticalPoint(floryHugginsFamily, { NA: 1, NB: 20, 'chi.A': 0.1, 'chi.B': 200 }, true),
        ...tieLines(floryHugginsFamily, { NA: 1, NB: 20, 'chi.A': 0.1, 'chi.B': 200 }, [300]),
      ],
    },
  ];
  for (const c of cases) {
    it(c.name, () => {
      const data = c.data();
      const fit = fitModel(c.family, specs(c.truth, c.free), data);
      const Tref = data.reduce((s, m) => s + (m.kind === 'critical point' ? m.Tc : m.T), 0) / data.length;
      for (const name of c.free) {
        const scale = Math.max(Math.abs(c.truth[name]), parameterUnit(name, Tref));
        expect(Math.abs(fit.values[name] - c.truth[name]) / scale, name).toBeLessThan(1e-7);
      }
      for (const [name, v] of Object.entries(c.truth)) if (!c.free.includes(name)) expect(fit.values[name], `${name} stays fixed`).toBe(v);
      expect(fit.condition).toBeLessThan(1e4);
      // residuals in their own units: compositions ~1e-13, kelvin ~1e-10 at most with exact data
      for (const row of fit.rows) expect(Math.abs(row.residual), `${row.quantity} of measurement ${row.measurement + 1}`).toBeLessThan(row.quantity === 'T' || row.quantity === 'Tc' ? 1e-7 : 1e-9);
    });
  }
});

describe('joint fit of several systems sharing the free parameters (fitSystems)', () => {
  // Three polymer fractions (NB = 100, 300, 1000 in a solvent, NA = 1) with one chi = A + B/T:
  // one critical temperature each (our critical-point search) gives A and B back. Same round
  // trip and tolerances as above.
  const truth = { 'chi.A': 0.2, 'chi.B': 100 };
  const NBs = [100, 300, 1000];
  const systems = NBs.map((NB) => ({ fixed: { NB }, data: [criticalPoint(floryHugginsFamily, { NA: 1, NB, ...truth }, false)] }));
  const spec: ParameterSpec[] = [{ name: 'NA', value: 1, free: false }, { name: 'chi.A', free: true }, { name: 'chi.B', free: true }];
  it('chi.A, chi.B from the critical temperatures of three chain lengths', () => {
    const fit = fitSystems(floryHugginsFamily, spec, systems);
    const Tref = systems.reduce((s, sys) => s + (sys.data[0] as { Tc: number }).Tc, 0) / 3;
    for (const name of ['chi.A', 'chi.B'] as const) {
      expect(Math.abs(fit.values[name] - truth[name]) / Math.max(Math.abs(truth[name]), parameterUnit(name, Tref)), name).toBeLessThan(1e-7);
    }
    expect(fit.models.map((m) => m.key)).toEqual(NBs.map((NB) => buildModel(floryHugginsFamily, { ...fit.values, NB }).key));
    expect(fit.rows.map((r) => r.system)).toEqual([0, 1, 2]);
    for (const row of fit.rows) expect(Math.abs(row.residual)).toBeLessThan(1e-7);
  });
  it('a parameter both free and fixed for one system, or unknown to the family', () => {
    expect(reason(() => fitSystems(floryHugginsFamily, spec, [{ fixed: { NB: 100, 'chi.A': 0.1 }, data: systems[0].data }]))).toMatch(/^input: system 1: chi\.A is free/);
    expect(reason(() => fitSystems(floryHugginsFamily, spec, [systems[0], { fixed: { NC: 3 }, data: systems[1].data }]))).toMatch(/^input: system 2: "NC" is not a parameter of the flory-huggins model/);
  });
});

describe('data that cannot determine the parameters: a named failure, never a number', () => {
  const truth = { L0: 22000, 'L0.b': -4 };
  it('a constant part and a slope from boundaries all at one temperature', () => {
    const data = boundaries(redlichKisterFamily, truth, [[800, 'low'], [800, 'high']]);
    const r = reason(() => fitModel(redlichKisterFamily, specs(truth, ['L0', 'L0.b']), data));
    expect(r).toMatch(/^input: the data cannot tell (L0 and L0\.b|L0\.b and L0) apart/);
  });
  it('fewer measured quantities than free parameters', () => {
    const data = boundaries(redlichKisterFamily, truth, [[800, 'low']]);
    expect(reason(() => fitModel(redlichKisterFamily, specs(truth, ['L0', 'L0.b']), data))).toMatch(/^input: 1 measured quantities cannot determine 2 free parameters/);
  });
  it('a start without the measured gap, given by the user', () => {
    const data = boundaries(regularFamily, { omega: 20000 }, [[800, 'low'], [900, 'low']]);
    expect(reason(() => fitModel(regularFamily, [{ name: 'omega', value: 1000, free: true }], data))).toMatch(/^none: the starting parameters give no model/);
  });
  it('a name the family does not have, and a fixed parameter without a value', () => {
    const data = boundaries(regularFamily, { omega: 20000 }, [[800, 'low']]);
    expect(reason(() => fitModel(regularFamily, [{ name: 'L0', free: true }], data))).toMatch(/^input: "L0" is not a parameter of the regular model/);
    expect(reason(() => fitModel(floryHugginsFamily, [{ name: 'NA', free: false }, { name: 'chi.B', free: true }], data))).toMatch(/^input: parameter NA is fixed but has no value/);
  });
});

describe('starts and ends that are not minima of S', () => {
  it('a grid start whose critical point is not the model\'s global one is passed over (Flory–Huggins, one measured Tc)', () => {
    // Flory, Principles of Polymer Chemistry (1953), ch. XIII: chi_c = (1/sqrt(NA) + 1/sqrt(NB))^2 / 2.
    // Before the check the grid kept chi.B = 535 K, where a fresh local solve found a spurious
    // sign change near 310 K, and the fit failed there; the fit is good to 1e-10 of its scale: 1e-8.
    const fit = fitModel(floryHugginsFamily, [{ name: 'NA', value: 1, free: false }, { name: 'NB', value: 100, free: false }, { name: 'chi.A', value: 0, free: false }, { name: 'chi.B', free: true }], [{ kind: 'critical point', Tc: 310 }]);
    expect(Math.abs(fit.values['chi.B'] / 310 / ((1 + 1 / Math.sqrt(100)) ** 2 / 2) - 1)).toBeLessThan(1e-8);
  });
  it('a minimum at the edge where a measured gap vanishes is refused, naming the parameter and the feature', () => {
    // a boundary at 1000 K needs Tc >= 1000 K, a critical point at 500 K pulls Tc down: S is
    // smallest where the gap at 1000 K just closes, and its slopes there are not those of a minimum
    const data: Measurement[] = [{ kind: 'boundary', T: 1000, x: 0.3, side: 'low' }, { kind: 'critical point', Tc: 500 }];
    expect(reason(() => fitModel(regularFamily, [{ name: 'omega', free: true }], data))).toMatch(/^convergence: the fit ran into the edge of what the model can describe: moving omega by -[\d.]+ .*no miscibility gap at T = 1000 K/);
  });
});

describe('weights: each row divided by its stated uncertainty', () => {
  // Weighted least squares (e.g. Bard, Nonlinear Parameter Estimation (1974), ch. 7): scaling every
  // sigma by c leaves the estimate and the relative-weight covariance s^2 (J^T J)^-1 unchanged and
  // multiplies the absolute covariance (J^T J)^-1 by c^2; the relative one is the absolute one
  // times S/(n - p). Noisy data (a fixed sequence of offsets) so that S > 0.
  const truth = { L0: 22000, 'L0.b': -4 };
  const offsets = [0.003, -0.002, 0.001, -0.004, 0.002, 0.0015, -0.001, 0.0025];
  const noisy = (sigma: number): Measurement[] => boundaries(redlichKisterFamily, truth, [[700, 'low'], [700, 'high'], [800, 'low'], [800, 'high'], [900, 'low'], [900, 'high'], [950, 'low'], [950, 'high']])
    .map((m, i) => ({ ...(m as Extract<Measurement, { kind: 'boundary' }>), x: (m as Extract<Measurement, { kind: 'boundary' }>).x + offsets[i], sigma }));
  const spec = specs(truth, ['L0', 'L0.b']);
  it('scaling every sigma by 10', () => {
    const a = fitModel(redlichKisterFamily, spec, noisy(0.002));
    const b = fitModel(redlichKisterFamily, spec, noisy(0.02));
    const abs = fitModel(redlichKisterFamily, spec, noisy(0.002), { absolute: true });
    const abs10 = fitModel(redlichKisterFamily, spec, noisy(0.02), { absolute: true });
    // the two fits stop at steps below 1e-10 of the parameters' scale: 1e-8 relative agreement
    for (const name of ['L0', 'L0.b']) expect(Math.abs(a.values[name] - b.values[name]) / Math.abs(a.values[name])).toBeLessThan(1e-8);
    for (let j = 0; j < 2; j++) {
      for (let k = 0; k < 2; k++) {
        const c = a.covariance![j][k];
        // the covariances come from central-difference Jacobians good to ~1e-8: 1e-6 relative
        expect(Math.abs(b.covariance![j][k] / c - 1)).toBeLessThan(1e-6);
        expect(Math.abs(abs10.covariance![j][k] / abs.covariance![j][k] - 100)).toBeLessThan(1e-4);
        expect(Math.abs((abs.covariance![j][k] * a.S) / a.dof / c - 1)).toBeLessThan(1e-6);
      }
    }
  });
  it('one row with a large uncertainty hardly moves the fit', () => {
    const data = noisy(0.002);
    const exact = boundaries(redlichKisterFamily, truth, [[850, 'low']])[0] as Extract<Measurement, { kind: 'boundary' }>;
    const outlier = { ...exact, x: exact.x + 0.05 };
    const trusted = fitModel(redlichKisterFamily, spec, [...data, { ...outlier, sigma: 0.002 }]);
    const doubted = fitModel(redlichKisterFamily, spec, [...data, { ...outlier, sigma: 1 }]);
    const base = fitModel(redlichKisterFamily, spec, data);
    // weight 1/500 of the others in the residual: the outlier's pull on L0 shrinks by ~500^2
    const pull = (f: typeof base) => Math.abs(f.values.L0 - base.values.L0);
    expect(pull(doubted)).toBeLessThan(1e-3 * pull(trusted));
  });
});
