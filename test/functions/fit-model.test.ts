/**
 * FITMODEL, FITSUMMARY, FITRESID, FITCOV (src/functions/fitModel.ts): synthetic data from known
 * parameters, for every model family and every kind of measurement, fitted back through the cell
 * functions; the fitted card used as params reproduces the data. Where a closed form exists the
 * data come from it (regular solution, Flory–Huggins critical point); elsewhere from our forward
 * solvers (a round trip through the binodal, gap-temperature and critical-point solvers: common
 * practice, no published source).
 */
import { describe, expect, it } from 'vitest';
import { phaseMap } from '../../src/core/binodal';
import { R } from '../../src/core/constants';
import { criticalPoints } from '../../src/core/critical';
import type { ModelFamily } from '../../src/core/family';
import { gapTemperature } from '../../src/core/gapTemperature';
import { buildModel } from '../../src/core/fit/parameters';
import { floryHugginsFamily } from '../../src/core/models/floryHuggins';
import { nrtlFamily } from '../../src/core/models/nrtl';
import { redlichKisterFamily } from '../../src/core/models/redlichKister';
import { fitCov, fitModel, fitResid, fitSummary, gapHigh, gapLow, tCrit, tGap, xCrit } from '../../src/functions/index';
import { failure } from './support/failure';

type Values = Record<string, number>;
type Row = unknown[];

/** The value of `key` on a spilled card. */
const valueOf = (card: unknown[][], key: string) => card.find((r) => r[0] === key)?.[1] as number;

/**
 * The symmetric gap of the regular solution: RT ln(x/(1-x)) = Omega (2x - 1), so the temperature at
 * which x is a boundary is T = Omega (1 - 2x) / (R ln((1-x)/x)) (common tangent of the symmetric
 * g = RT[x ln x + (1-x) ln(1-x)] + Omega x (1-x); e.g. Porter, Easterling & Sherif, Phase
 * Transformations in Metals and Alloys, 3rd ed. (2009), ch. 1, the regular solution).
 */
const regularT = (omega: number, x: number) => (omega * (1 - 2 * x)) / (R * Math.log((1 - x) / x));

/** Data rows from our forward solvers. */
function forward(family: ModelFamily, truth: Values) {
  const model = buildModel(family, truth);
  const gap = (T: number) => phaseMap(model.at(T)).gaps[0];
  return {
    tie: (T: number): Row => ['tie-line', T, gap(T).low.x, gap(T).high.x],
    boundary: (T: number, side: 'low' | 'high'): Row => ['boundary', T, gap(T)[side].x, side],
    cloud: (x0: number): Row => ['cloud point', gapTemperature(model, x0, criticalPoints(model)), x0],
    critical: (withX: boolean): Row => {
      const c = criticalPoints(model)[0];
      return withX ? ['critical point', c.T, c.x] : ['critical point', c.T];
    },
  };
}

describe('every family, every kind of measurement, back through FITMODEL', () => {
  // The data carry the forward solvers' rounding (compositions ~1e-15, temperatures 1e-13
  // relative); the core fit stops at steps below 1e-10 of a parameter's scale and the condition
  // numbers here are below 1e4, so parameters come back to 1e-7 of their scale
  // (test/core/fit/nonlinear.test.ts gives the same margin). The scale is max(|value|, the change
  // that moves g/RT by ~1) — R T for energies, R for slopes, T for chi.B and b_ij, 1 otherwise.
  const cases: Array<{ name: string; start: Row[]; truth: Values; scale: Values; data: () => Row[]; energy?: number }> = [
    {
      name: 'regular solution from tie-lines of the closed form, in kJ/mol and °C',
      start: [['model', 'regular'], ['omega', '', 'fit'], ['energy', 'kJ/mol'], ['temperature', '°C']],
      truth: { omega: 20 }, scale: { omega: 20 },
      data: () => [0.05, 0.1, 0.2].map((x) => ['tie-line', regularT(20000, x) - 273.15, x, 1 - x]),
    },
    {
      name: 'regular solution from boundary points and cloud points of the closed form',
      start: [['model', 'regular'], ['omega', 19000, 'fit']],
      truth: { omega: 21000 }, scale: { omega: 21000 },
      data: () => [
        ['boundary', regularT(21000, 0.08), 0.08, 'low'],
        ['boundary', regularT(21000, 0.12), 0.88, 'high'],
        ['cloud point', regularT(21000, 0.3), 0.3],
        ['cloud point', regularT(21000, 0.15), 0.85],
      ],
    },
    {
      name: 'Redlich–Kister L0, L0.b, L1 from tie-lines, boundary points and a critical point (Tc, xc)',
      start: [['model', 'rk'], ['L0', '', 'fit'], ['L0.b', '', 'fit'], ['L1', '', 'fit']],
      truth: { L0: 22000, 'L0.b': -4, L1: 3000 }, scale: { L0: 22000, 'L0.b': R * 1, L1: 3000 },
      data: () => {
        const f = forward(redlichKisterFamily, { L0: 22000, 'L0.b': -4, L1: 3000 });
        return [f.tie(700), f.boundary(800, 'low'), f.boundary(900, 'high'), f.critical(true)];
      },
    },
    {
      name: 'Flory–Huggins chi = A + B/T with chain lengths fixed (1, 80), from cloud points',
      start: [['model', 'flory-huggins'], ['NA', 1], ['NB', 80, 'fixed'], ['chi.A', '', 'fit'], ['chi.B', '', 'fit']],
      truth: { 'chi.A': -0.15, 'chi.B': 280 }, scale: { 'chi.A': 1, 'chi.B': 400 },
      data: () => {
        const f = forward(floryHugginsFamily, { NA: 1, NB: 80, 'chi.A': -0.15, 'chi.B': 280 });
        return [f.cloud(0.03), f.cloud(0.06), f.cloud(0.12), f.cloud(0.25), f.critical(false)];
      },
    },
    {
      name: 'NRTL a12, b12, a21, b21 with alpha fixed at 0.3, from mutual solubilities at four temperatures',
      start: [['model', 'nrtl'], ['a12', '', 'fit'], ['b12', '', 'fit'], ['a21', '', 'fit'], ['b21', '', 'fit'], ['alpha', 0.3]],
      truth: { a12: 1, b12: 300, a21: -0.5, b21: 900 }, scale: { a12: 1, b12: 320, a21: 1, b21: 900 },
      data: () => {
        const f = forward(nrtlFamily, { a12: 1, b12: 300, a21: -0.5, b21: 900, alpha: 0.3 });
        return [f.tie(290), f.tie(310), f.tie(330), f.tie(350)];
      },
    },
    {
      name: 'NRTL b12, b21 with alpha fixed at 0.25, from boundary points and cloud points',
      start: [['model', 'nrtl'], ['a12', 0], ['b12', '', 'fit'], ['a21', 0], ['b21', '', 'fit'], ['alpha', 0.25, 'fixed']],
      truth: { b12: 800, b21: 600 }, scale: { b12: 800, b21: 600 },
      data: () => {
        const f = forward(nrtlFamily, { a12: 0, b12: 800, a21: 0, b21: 600, alpha: 0.25 });
        return [f.boundary(300, 'low'), f.boundary(320, 'high'), f.cloud(0.2), f.cloud(0.6)];
      },
    },
    {
      name: 'Flory–Huggins chi.A, chi.B (NA = 1, NB = 20 fixed) from a tie-line, boundary points and a critical point (Tc, xc)',
      start: [['model', 'fh'], ['NA', 1], ['NB', 20], ['chi.A', '', 'fit'], ['chi.B', 150, 'fit']],
      truth: { 'chi.A': 0.1, 'chi.B': 200 }, scale: { 'chi.A': 1, 'chi.B': 300 },
      data: () => {
        const f = forward(floryHugginsFamily, { NA: 1, NB: 20, 'chi.A': 0.1, 'chi.B': 200 });
        return [f.tie(280), f.boundary(290, 'low'), f.boundary(300, 'high'), f.critical(true)];
      },
    },
  ];
  for (const c of cases) {
    it(c.name, () => {
      const data = c.data();
      const card = fitModel(c.start, data) as unknown[][];
      for (const [name, v] of Object.entries(c.truth)) {
        expect(Math.abs(valueOf(card, name) - v) / c.scale[name], name).toBeLessThan(1e-7);
        expect(valueOf(card, `u(${name})`), `u(${name})`).toBeGreaterThanOrEqual(0);
      }
      // the card without its u() and r() rows works as params: it gives the data back (to the 1e-7
      // of the parameters, times sensitivities of order 1: 1e-6 in composition, 1e-4 K)
      const plain = fitModel(c.start, data, undefined, false) as unknown[][];
      expect(plain.some((r) => /^[ur]\(/.test(String(r[0])))).toBe(false);
      for (const row of data) {
        if (row[0] === 'tie-line') {
          expect(Math.abs(gapLow(row[1] as number, plain) - (row[2] as number))).toBeLessThan(1e-6);
          expect(Math.abs(gapHigh(row[1] as number, plain) - (row[3] as number))).toBeLessThan(1e-6);
        } else if (row[0] === 'boundary') {
          const got = row[3] === 'low' ? gapLow(row[1] as number, plain) : gapHigh(row[1] as number, plain);
          expect(Math.abs(got - (row[2] as number))).toBeLessThan(1e-6);
        } else if (row[0] === 'cloud point') {
          expect(Math.abs(tGap(row[2] as number, plain) - (row[1] as number))).toBeLessThan(1e-4);
        } else {
          expect(Math.abs(tCrit(plain) - (row[1] as number))).toBeLessThan(1e-4);
          if (row.length > 2) expect(Math.abs(xCrit(plain) - (row[2] as number))).toBeLessThan(1e-6);
        }
      }
      // residuals: one row per data row, in their own units, all at rounding level (see above)
      const resid = fitResid(c.start, data) as unknown[][];
      expect(resid).toHaveLength(data.length);
      resid.forEach((r, i) => {
        const kelvin = data[i][0] === 'cloud point' || data[i][0] === 'critical point';
        expect(Math.abs(r[0] as number), `row ${i + 1}`).toBeLessThan(kelvin ? 1e-4 : 1e-6);
        const second = data[i][0] === 'tie-line' || (data[i][0] === 'critical point' && data[i].length > 2);
        if (second) expect(Math.abs(r[1] as number)).toBeLessThan(1e-6);
        else expect(r[1]).toBe('');
      });
    });
  }
});

describe('published closed forms through FITMODEL', () => {
  it('regular solution: one critical temperature gives Omega = 2 R Tc', () => {
    // Porter, Easterling & Sherif, Phase Transformations in Metals and Alloys, 3rd ed. (2009), ch. 1:
    // the regular solution's gap closes at Tc = Omega / 2R, x = 1/2.
    const card = fitModel([['model', 'regular'], ['omega', '', 'fit']], [['critical point', 650]], undefined, false) as unknown[][];
    // the fit stops at 1e-10 of the parameter's scale; the critical search to 1e-13: 1e-9 relative
    expect(Math.abs(valueOf(card, 'omega') / (2 * R * 650) - 1)).toBeLessThan(1e-9);
  });

  it('Flory–Huggins: a critical point gives chi_c = (1/sqrt(NA) + 1/sqrt(NB))^2 / 2 at phi_c = 1/(1 + sqrt(NB/NA))', () => {
    // Flory, Principles of Polymer Chemistry (1953), ch. XIII (critical conditions of a
    // polymer-solvent system, generalised to two chain lengths): chi_c and phi_c (volume fraction of B).
    const NA = 1, NB = 100, Tc = 310;
    const chiC = (1 / Math.sqrt(NA) + 1 / Math.sqrt(NB)) ** 2 / 2;
    const card = fitModel([['model', 'fh'], ['NA', NA], ['NB', NB], ['chi.A', 0], ['chi.B', '', 'fit']], [['critical point', Tc]], undefined, false) as unknown[][];
    // chi = chi.B / Tc at the critical point; the critical search is good to 1e-13, the fit to 1e-10 of its scale
    expect(Math.abs(valueOf(card, 'chi.B') / Tc / chiC - 1)).toBeLessThan(1e-8);
    expect(Math.abs(xCrit(card) - 1 / (1 + Math.sqrt(NB / NA)))).toBeLessThan(1e-8);
  });
});

describe('the card and its uncertainty', () => {
  // Noisy regular-solution tie-lines (fixed offsets): omega and a slope, two free parameters.
  const omega = 20000;
  const offsets = [0.004, -0.003, 0.002, -0.001, 0.003, -0.002];
  const data: Row[] = [0.05, 0.1, 0.2].flatMap((x, i) => [
    ['boundary', regularT(omega, x), x + offsets[2 * i], 'low'],
    ['boundary', regularT(omega, x), 1 - x + offsets[2 * i + 1], 'high'],
  ]);
  const start: Row[] = [['model', 'redlich-kister'], ['L0', '', 'fit'], ['L0.b', '', 'fit'], ['energy', 'kJ/mol'], ['name A', 'avarite'], ['name B', 'bexium']];

  it('u() and r() rows in the contract\'s form, in the card\'s units, matching FITCOV', () => {
    const card = fitModel(start, data) as unknown[][];
    expect(card.map((r) => r[0])).toEqual(['model', 'L0', 'L0.b', 'energy', 'temperature', 'name A', 'name B', 'u(L0)', 'u(L0.b)', 'r(L0, L0.b)']);
    expect(valueOf(card, 'temperature')).toBe('K');
    const cov = fitCov(start, data) as unknown[][];
    expect(cov[0]).toEqual(['', 'L0', 'L0.b']);
    expect(cov.map((r) => r[0])).toEqual(['', 'L0', 'L0.b']);
    const C = cov.slice(1).map((r) => r.slice(1) as number[]);
    // the same numbers: u = sqrt(C_jj), r = C_jk / (u_j u_k), to rounding (1e-12 relative)
    expect(Math.abs(valueOf(card, 'u(L0)') / Math.sqrt(C[0][0]) - 1)).toBeLessThan(1e-12);
    expect(Math.abs(valueOf(card, 'u(L0.b)') / Math.sqrt(C[1][1]) - 1)).toBeLessThan(1e-12);
    expect(Math.abs(valueOf(card, 'r(L0, L0.b)') - C[0][1] / Math.sqrt(C[0][0] * C[1][1]))).toBeLessThan(1e-12);
    expect(C[0][1]).toBe(C[1][0]);
    // a constant part and a slope fitted over a narrow range of T are strongly anti-correlated
    expect(valueOf(card, 'r(L0, L0.b)')).toBeLessThan(-0.9);
    // kJ/mol on the card: u(L0) in kJ/mol, the same fit in J/mol gives 1000 times the numbers (1e-9: two fits, same data)
    const inJ = fitModel(start.filter((r) => r[0] !== 'energy'), data) as unknown[][];
    expect(Math.abs(valueOf(inJ, 'u(L0)') / valueOf(card, 'u(L0)') / 1000 - 1)).toBeLessThan(1e-9);
    expect(Math.abs(valueOf(inJ, 'L0') / valueOf(card, 'L0') / 1000 - 1)).toBeLessThan(1e-9);
  });

  it('"absolute" weights: u from the stated uncertainties alone, scaled as they are', () => {
    const stated = (s: number) => data.map((r) => [...r, s]);
    const a = fitModel(start, stated(0.003), 'absolute') as unknown[][];
    const b = fitModel(start, stated(0.006), 'absolute') as unknown[][];
    // C = (J^T J)^-1 with J divided by sigma: doubling every sigma doubles every u (Bard, Nonlinear
    // Parameter Estimation (1974), ch. 7); Jacobians good to ~1e-8: 1e-6 relative
    expect(Math.abs(valueOf(b, 'u(L0)') / valueOf(a, 'u(L0)') - 2)).toBeLessThan(1e-6);
    // with relative weights the same data give the same u whatever sigma is stated
    const r1 = fitModel(start, stated(0.003)) as unknown[][];
    const r2 = fitModel(start, stated(0.006)) as unknown[][];
    expect(Math.abs(valueOf(r2, 'u(L0)') / valueOf(r1, 'u(L0)') - 1)).toBeLessThan(1e-6);
  });

  it('FITSUMMARY says it in one line, its ± the card\'s u to two significant digits', () => {
    const line = fitSummary(start, data);
    const card = fitModel(start, data) as unknown[][];
    const u = Number((valueOf(card, 'u(L0)') as number).toPrecision(2));
    expect(line).toMatch(/^redlich-kister: L0 = -?[\d.]+ ± [\d.]+ kJ\/mol, L0\.b = -?[\d.]+ ± [\d.]+ kJ\/mol per K \(± standard uncertainty, from the scatter of the data\); 6 measurements, 6 residuals, 2 fitted parameters, 4 degrees of freedom; weighted sum of squares [\d.e-]+, reduced chi-square [\d.e-]+; condition number [\d.]+$/);
    expect(line).toContain(`± ${u}`);
  });

  it('the fitted card feeds GAPLOW directly (without its u() rows), and FITRESID is the model minus the data', () => {
    const card = fitModel(start, data, undefined, false) as unknown[][];
    // padded as the embedded engine pads a spill (empty cells) or as a range over blank cells (""):
    // the card reader skips those rows, so the padded card is the same system
    const T = data[0][1] as number;
    expect(gapLow(T, [...card, [null, null], ['', '']])).toBe(gapLow(T, card));
    const resid = fitResid(start, data) as number[][];
    data.forEach((row, i) => {
      const model = row[3] === 'low' ? gapLow(row[1] as number, card) : gapHigh(row[1] as number, card);
      // the fit's residual and GAPLOW of its card: the same solver at the same parameters, up to the
      // card's kJ/mol round trip (1e-15 relative on L0): 1e-12
      expect(Math.abs(resid[i][0] - (model - (row[2] as number)))).toBeLessThan(1e-12);
    });
  });
});
