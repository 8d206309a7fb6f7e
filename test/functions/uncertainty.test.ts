/**
 * UNCERTAINTY and GAPBAND (src/functions/uncertainty.ts) over cards with u() and r() rows, and the
 * general linear propagation behind them (src/core/fit/propagation.ts `propagateOver`):
 * - closed forms: the regular solution's Tc = Omega / 2R, so u(Tc) = u(Omega) / 2R exactly;
 * - Monte Carlo propagation (parameters drawn from their covariance, seeded) of GAPLOW and TCRIT
 *   on a card far from critical agrees with the linear propagation within 2 %;
 * - near a critical point, or where the gap closes within the band: #N/A with the reason;
 * - bad requests: #VALUE! saying what to fix; the same answers through the embedded engine.
 */
import { readFileSync } from 'fs';
import path from 'path';
import { describe, expect, it } from 'vitest';
import { phaseMap } from '../../src/core/binodal';
import { buildModel } from '../../src/core/fit/parameters';
import { propagateOver } from '../../src/core/fit/propagation';
import { MixgapError } from '../../src/core/errors';
import { redlichKisterFamily, regularFamily } from '../../src/core/models/redlichKister';
import { gapHigh, gapLow, tCrit } from '../../src/functions/functions';
import { gapBand, uncertainty } from '../../src/functions/uncertainty';
import { gaussian } from '../core/fit/support/synthetic';
import { evaluateIn } from './support/evaluate';
import { failure } from './support/failure';

/** R from the spec (CODATA 2018, exact by the 2019 SI definitions). */
const R = 8.314462618;

type Card = any[][];
const U = uncertainty as (name: string, ...args: unknown[]) => number;

// Invented card: Tc = 1228.7 K, far above 800 K.
const L0 = 20000, L1 = 2000, uL0 = 150, uL1 = 120, r01 = -0.6;
const rk: Card = [['model', 'rk'], ['L0', L0], ['L1', L1], ['u(L0)', uL0], ['u(L1)', uL1], ['r(L0, L1)', r01]];

/** Standard deviation of f over (L0, L1) drawn from N(mean, C) (Cholesky factor of the 2 x 2 C), seeded. */
function monteCarlo(f: (a: number, b: number) => number, mean: [number, number], u: [number, number], r: number, samples: number, seed: number): number {
  const noise = gaussian(seed);
  let sum = 0, sum2 = 0;
  for (let i = 0; i < samples; i++) {
    const z1 = noise(), z2 = noise();
    const v = f(mean[0] + u[0] * z1, mean[1] + u[1] * (r * z1 + Math.sqrt(1 - r * r) * z2));
    sum += v; sum2 += v * v;
  }
  const m = sum / samples;
  return Math.sqrt((sum2 - samples * m * m) / (samples - 1));
}

describe('closed form: regular solution, Tc = Omega / 2R (Porter & Easterling, Phase Transformations in Metals and Alloys, 2nd ed. 1992, sec. 1.3.4)', () => {
  // Tc is linear in Omega, so u(Tc) = u(Omega) / 2R exactly and the central difference has no
  // truncation error; what is left is the solver's rounding of Tc (a few ulp of 1200 K, ~1e-12 K)
  // over a step of 2 J/mol, ~1e-12 relative: 1e-8 leaves ample room.
  it('u(Tc) = u(Omega) / 2R, in J/mol and kelvin', () => {
    const card = [['model', 'regular'], ['omega', 20000], ['u(omega)', 200]];
    expect(Math.abs(U('TCRIT', card) / (200 / (2 * R)) - 1)).toBeLessThan(1e-8);
  });
  it('the same in kJ/mol and °C (a temperature difference has no offset)', () => {
    const card = [['model', 'regular'], ['energy', 'kJ/mol'], ['temperature', '°C'], ['omega', 20], ['u(omega)', 0.2]];
    expect(Math.abs(U('MIXGAP.tcrit', card) / (200 / (2 * R)) - 1)).toBeLessThan(1e-8);
  });
  it('XCRIT of the symmetric regular solution is 1/2 whatever Omega: its uncertainty is 0', () => {
    expect(U('XCRIT', [['model', 'regular'], ['omega', 20000], ['u(omega)', 200]])).toBe(0);
  });
  it('a parameter without u() does not count: u(Tc) from u(L0.b) alone, Tc = a / (2R - b) for Omega = a + b T (the same closed form, Omega at Tc)', () => {
    const a = 20000, b = -2, ub = 0.5;
    const card = [['model', 'rk'], ['L0', a], ['L0.b', b], ['u(L0.b)', ub]];
    // d Tc / d b = a / (2R - b)^2; the central step h is 1 % of u(b), so the truncation error is
    // (h / (2R - b))^2 ~ 1e-7 relative: 1e-5 leaves room for the solver's rounding as well.
    expect(Math.abs(U('TCRIT', card) / ((a / (2 * R - b) ** 2) * ub) - 1)).toBeLessThan(1e-5);
  });
});

describe('linear propagation agrees with Monte Carlo propagation within 2 % far from critical', () => {
  // 20000 samples: the relative standard error of a standard deviation is 1/sqrt(2 N) = 0.5 %, so
  // 2 % is four standard errors (and the curvature of the results over the band is far smaller).
  it('GAPLOW at 800 K (Tc = 1229 K), through the core binodal', () => {
    const low = (a: number, b: number) => phaseMap(buildModel(redlichKisterFamily, { L0: a, L1: b }).at(800)).gaps[0].low.x;
    const mc = monteCarlo(low, [L0, L1], [uL0, uL1], r01, 20000, 21);
    expect(Math.abs(U('GAPLOW', 800, rk) / mc - 1)).toBeLessThan(0.02);
  });
  it('TCRIT of Omega = a + b T, Tc = a / (2R - b) (closed form, as above), sampled', () => {
    const card = [['model', 'rk'], ['L0', 20000], ['L0.b', -2], ['u(L0)', 400], ['u(L0.b)', 0.4], ['r(L0, L0.b)', 0.5]];
    const mc = monteCarlo((a, b) => a / (2 * R - b), [20000, -2], [400, 0.4], 0.5, 20000, 22);
    expect(Math.abs(U('TCRIT', card) / mc - 1)).toBeLessThan(0.02);
  });
});

describe('results that are not defined or not linear within the band are #N/A, never a number', () => {
  it('GAPLOW 2 K below Tc, where u(Tc) is ~7 K: the gap closes within the band', () => {
    const Tc = tCrit(rk);
    const f = failure(() => U('GAPLOW', Tc - 2, rk));
    expect(f.code).toBe('#N/A');
    expect(f.message).toMatch(/GAPLOW (does not exist everywhere|is too far from linear) within 2 standard uncertainties/);
  });
  it('GAPLOW 27 K below Tc: the gap exists but x\' ~ sqrt(Tc - T) is too far from linear', () => {
    const f = failure(() => U('GAPLOW', 1201, rk));
    expect(f.code).toBe('#N/A');
    expect(f.message).toMatch(/too far from linear within 2 standard uncertainties.*as near a critical point/);
  });
  it('above Tc the function\'s own #N/A comes first', () => {
    const f = failure(() => U('GAPHIGH', 1300, rk));
    expect(f.code).toBe('#N/A');
    expect(f.message).toBe(failure(() => gapHigh(1300, rk)).message);
  });
  it('PHASEFRAC of a composition outside the gap but within the band of its boundary jumps: #N/A', () => {
    // x0 just below x' at 800 K (x' = 0.0488, u ~ 0.0011): fraction 0 here, > 0 within the band
    const f = failure(() => U('PHASEFRAC', 0.048, 800, rk));
    expect(f.code).toBe('#N/A');
  });
  it('the core refuses a result that stops existing along the band (reason none)', () => {
    const p = { values: { omega: 20000 }, names: ['omega'], covariance: [[200 * 200]] };
    const Tc = (v: Record<string, number>) => {
      if (v.omega > 20100) throw new MixgapError('none', 'no gap');
      return v.omega / (2 * R);
    };
    expect(() => propagateOver(p, Tc, 'Tc')).toThrow(/Tc does not exist everywhere within 2 standard uncertainties/);
    expect(propagateOver(p, (v) => v.omega / (2 * R), 'Tc').sigma).toBeCloseTo(200 / (2 * R), 9);
  });
});

describe('GAPBAND', () => {
  it('its columns are the boundaries and boundary -+ k u, u as UNCERTAINTY gives it; #N/A above Tc', () => {
    const table = gapBand(800, 1300, 3, rk, 2) as unknown[][];
    const [row800, row1050, row1300] = table;
    expect(row800[0]).toBe(800);
    expect(row800[1]).toBe(gapLow(800, rk));
    expect(row800[4]).toBe(gapHigh(800, rk));
    const uLow = U('GAPLOW', 800, rk), uHigh = U('GAPHIGH', 800, rk);
    // the same solves in the same order: equal to rounding of the subtraction (1e-15)
    expect(row800[2] as number).toBeCloseTo(gapLow(800, rk) - 2 * uLow, 14);
    expect(row800[3] as number).toBeCloseTo(gapLow(800, rk) + 2 * uLow, 14);
    expect(row800[5] as number).toBeCloseTo(gapHigh(800, rk) - 2 * uHigh, 14);
    expect(row800[6] as number).toBeCloseTo(gapHigh(800, rk) + 2 * uHigh, 14);
    expect(row1050.every((v) => typeof v === 'number')).toBe(true);
    expect(row1300.slice(1).every((v) => v instanceof Error && (v as { code?: string }).code === '#N/A')).toBe(true);
  });
  it('k = 1 gives a band half as wide as k = 2 where both are defined', () => {
    const [one] = gapBand(800, 900, 2, rk, 1) as number[][];
    const [two] = gapBand(800, 900, 2, rk) as number[][];
    expect((one[3] - one[2]) / (two[3] - two[2])).toBeCloseTo(0.5, 12);
  });
  it('a card without u() is #VALUE! saying what to add', () => {
    const f = failure(() => gapBand(800, 900, 2, [['model', 'regular'], ['omega', 20000]]));
    expect(f.code).toBe('#VALUE!');
    expect(f.message).toMatch(/the card carries no uncertainties: add u\(\.\.\.\) rows/);
  });
});

describe('bad requests say what to fix', () => {
  const plain: Card = [['model', 'regular'], ['omega', 20000]];
  const cases: Array<[string, () => unknown, RegExp]> = [
    ['a card without u()', () => U('GAPLOW', 800, plain), /the card carries no uncertainties: add u\(\.\.\.\) rows or use the card a fit returns/],
    ['an unknown function', () => U('GAPWIDTH', 800, rk), /"GAPWIDTH" is not a function UNCERTAINTY answers for; write one of GAPLOW, GAPHIGH/],
    ['a count', () => U('GAPCOUNT', 800, rk), /a count has no standard uncertainty/],
    ['too many arguments', () => U('TCRIT', rk, 1, 2), /TCRIT takes at most 2 arguments/],
    ['no card where the function has it', () => U('GAPLOW', 800), /GAPLOW needs its parameter card as argument 2/],
  ];
  for (const [what, call, message] of cases) {
    it(what, () => {
      const f = failure(call);
      expect(f.code).toBe('#VALUE!');
      expect(f.message).toMatch(message);
    });
  }
});

describe('through the embedded engine (a card as an inline array, arguments as 1 x 1 ranges)', () => {
  const metadata = JSON.parse(readFileSync(path.join(__dirname, '..', '..', 'dist', 'functions.json'), 'utf8'));
  const card = '{"model","regular";"omega",20000;"u(omega)",200}';
  it('UNCERTAINTY gives what the function gives in Node; GAPBAND spills rows x 7', () => {
    const [tc, low, act, band] = evaluateIn(metadata, [
      `=MIXGAP.UNCERTAINTY("TCRIT", ${card})`,
      `=MIXGAP.UNCERTAINTY("GAPLOW", 900, ${card})`,
      `=MIXGAP.UNCERTAINTY("ACTIVITY", 0.2, 900, ${card}, "A")`,
      `=MIXGAP.GAPBAND(900, 1100, 3, ${card})`,
    ]);
    const nodeCard = [['model', 'regular'], ['omega', 20000], ['u(omega)', 200]];
    expect(tc).toBe(U('TCRIT', nodeCard));
    expect(low).toBe(U('GAPLOW', 900, nodeCard));
    expect(act).toBe(U('ACTIVITY', 0.2, 900, nodeCard, 'A'));
    expect((band as unknown[][]).length).toBe(3);
    expect((band as unknown[][])[0].length).toBe(7);
  });
});
