/**
 * The fitting and conversion cell functions as a spreadsheet sees them: through the embedded
 * formula engine, with metadata generated from the JSDoc tags of src/functions/sources.js and the
 * spill sizes of src/functions/shapes.ts.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type { HyperFormula } from 'hyperformula';
import { phaseMap } from '../../src/core/binodal';
import { redlichKister } from '../../src/core/models/redlichKister';
import * as fns from '../../src/functions/index';
import { spillShape } from '../../src/functions/shapes';
import { buildEngine } from '../../src/hosts/engine';
import { evaluateFormulas } from '../../src/hosts/evaluate';
import { generatedMetadata } from './support/evaluate';

let engine: HyperFormula;

const shape = spillShape;

beforeAll(async () => {
  const metadata = await generatedMetadata();
  engine = buildEngine(metadata, fns as Record<string, unknown>, shape);
});

const evaluate = (formula: string) => evaluateFormulas(engine, [formula])[0];
/** A failure of a spilled function shows over its whole range: its first cell. */
const first = (v: unknown) => (Array.isArray(v) ? (v as unknown[][])[0][0] : v);
const arrayOf = (rows: number[][]) => `{${rows.map((r) => r.join(',')).join(';')}}`;

// Tie-lines of a known two-term model (the core's binodal solver), written into the formula.
const truth = [{ a: 22000, b: -4, c: 0 }, { a: 3000, b: 1.5, c: 0 }];
const model = redlichKister(truth);
const tieLines = [700, 800, 900, 1000, 1100].map((T) => {
  const gap = phaseMap(model.at(T)).gaps[0];
  return [T, gap.low.x, gap.high.x];
});
const data = arrayOf(tieLines);

describe('FITTIELINES', () => {
  it('spills terms x 3 coefficients that give the model back', () => {
    const got = evaluate(`=MIXGAP.FITTIELINES(${data}, 2, TRUE)`) as number[][];
    expect(got).toHaveLength(2);
    got.forEach((row, k) => {
      // round trip through 17-digit literals: 1e-9 relative as in test/core/fit/tieLines.test.ts
      expect(Math.abs(row[0] - truth[k].a)).toBeLessThan(1e-9 * 30000);
      expect(Math.abs(row[1] - truth[k].b)).toBeLessThan(1e-9 * 30);
      expect(row[2]).toBe(0);
    });
  });

  it('feeds GAPLOW directly: =MIXGAP.GAPLOW(T, MIXGAP.FITTIELINES(...))', () => {
    // The refitted model's boundary at a temperature between the tie-lines is the true one to
    // the round trip's accuracy (1e-9).
    const want = phaseMap(model.at(850)).gaps[0].low.x;
    const got = evaluate(`=MIXGAP.GAPLOW(850, MIXGAP.FITTIELINES(${data}, 2, TRUE))`) as number;
    expect(Math.abs(got - want)).toBeLessThan(1e-9);
  });

  it('per-term slopes and standard errors', () => {
    const errors = evaluate(`=MIXGAP.FITTIELINES(${data}, 2, {TRUE,FALSE}, "errors")`) as unknown[][];
    expect(typeof errors[0][0]).toBe('number');
    expect(typeof errors[0][1]).toBe('number');
    expect(errors[1][1]).toEqual({ error: '#N/A', message: 'b of L1 was not fitted (fixed at 0)' });
    expect(errors[0][2]).toEqual({ error: '#N/A', message: 'c of L0 was not fitted (fixed at 0)' });
  });

  it('says what to fix', () => {
    expect(first(evaluate(`=MIXGAP.FITTIELINES(${arrayOf(tieLines.slice(0, 1))}, 2, TRUE)`))).toEqual({
      error: '#VALUE!',
      message: expect.stringMatching(/^1 tie-line gives 2 equations for 4 coefficients: the fit is under-determined/),
    });
    expect(first(evaluate('=MIXGAP.FITTIELINES({700,0.5,0.2}, 1)'))).toEqual({ error: '#NUM!', message: expect.stringMatching(/data row 1: x' = 0.5 must be below x'' = 0.2/) });
    expect(first(evaluate(`=MIXGAP.FITTIELINES(${data}, 2, {TRUE,FALSE,TRUE})`))).toEqual({ error: '#VALUE!', message: expect.stringMatching(/slopes has 3 values for 2 terms/) });
    expect(first(evaluate(`=MIXGAP.FITTIELINES(${data}, 2, TRUE, "sigma")`))).toEqual({ error: '#VALUE!', message: expect.stringMatching(/write "coefficients" or "errors"/) });
    expect(first(evaluate(`=MIXGAP.FITTIELINES(${data}, 1+1)`))).toEqual({ error: '#VALUE!', message: expect.stringMatching(/write the number of terms \(2nd argument\) as a number/) });
  });

  it('skips a first row of column titles', () => {
    const got = evaluate(`=MIXGAP.FITTIELINES({"T","x'","x''";${tieLines.map((r) => r.join(',')).join(';')}}, 2, TRUE)`) as number[][];
    expect(Math.abs(got[0][0] - truth[0].a)).toBeLessThan(1e-9 * 30000);
  });

  it('FITINFO summarises the fit in one line', () => {
    expect(evaluate(`=MIXGAP.FITINFO(${data}, 2, TRUE)`)).toMatch(/^2 terms, 4 coefficients from 5 tie-lines \(10 equations\); 6 degrees of freedom; rms composition residual [\d.e-]+; condition number [\d.]+$/);
  });
});

describe('GAPRESID', () => {
  it('is the model boundary minus the measured composition', () => {
    const want = phaseMap(model.at(900)).gaps[0].high.x;
    const got = evaluate(`=MIXGAP.GAPRESID(900, 0.7, ${arrayOf(truth.map((t) => [t.a, t.b, t.c]))}, "high")`) as number;
    expect(got).toBe(want - 0.7);
  });

  it('#N/A above the model\'s critical temperature, and a side is required', () => {
    expect(evaluate('=MIXGAP.GAPRESID(2000, 0.3, 20000, "low")')).toEqual({ error: '#N/A', message: expect.stringMatching(/no miscibility gap at T = 2000 K/) });
    expect(evaluate('=MIXGAP.GAPRESID(800, 0.3, 20000, "left")')).toEqual({ error: '#VALUE!', message: expect.stringMatching(/write "low" .* or "high"/) });
  });
});

describe('FITCRIT and FITNRTL', () => {
  it('FITCRIT spills 2 x 3 coefficients whose critical point is the one given', () => {
    expect(evaluate('=MIXGAP.TCRIT(MIXGAP.FITCRIT(650, 0.4))') as number).toBeCloseTo(650, 6);
    expect(evaluate('=MIXGAP.XCRIT(MIXGAP.FITCRIT(650, 0.4))') as number).toBeCloseTo(0.4, 6);
    // spec closed form: Tc = Omega / 2R for the regular solution
    expect(evaluate('=MIXGAP.FITCRIT(650)')).toEqual([[2 * 8.314462618 * 650, 0, 0], [0, 0, 0]]);
  });

  it('FITNRTL spills a card that GAPLOW and GAPHIGH read back', () => {
    const card = evaluate('=MIXGAP.FITNRTL(320, 0.05, 0.7, 0.3)') as unknown[][];
    expect(card.map((r) => r[0])).toEqual(['model', 'a12', 'b12', 'a21', 'b21', 'alpha']);
    // the binodal solver at 320 K must return the solubilities that were fitted (1e-7: the fit's acceptance test)
    expect(Math.abs((evaluate('=MIXGAP.GAPLOW(320, MIXGAP.FITNRTL(320, 0.05, 0.7, 0.3))') as number) - 0.05)).toBeLessThan(1e-7);
    expect(Math.abs((evaluate('=MIXGAP.GAPHIGH(320, MIXGAP.FITNRTL(320, 0.05, 0.7, 0.3, "constant"))') as number) - 0.7)).toBeLessThan(1e-7);
  });
});

describe('conversions', () => {
  it('element symbols, formulas and numbers as molar masses', () => {
    // Callister & Rethwisch, Materials Science and Engineering: An Introduction, Example Problem 4.4:
    // 3 wt% Cu in Al is 1.30 at% Cu
    expect(Math.abs((evaluate('=MIXGAP.MOLPCT(3, "Al", "Cu")') as number) - 1.3)).toBeLessThan(0.005);
    expect(Math.abs((evaluate('=MIXGAP.MOLPCT(3, 26.98, 63.55)') as number) - 1.3)).toBeLessThan(0.005);
    expect(evaluate('=MIXGAP.WTPCT(MIXGAP.MOLPCT(40, "H2O", "C6H5OH"), "H2O", "C6H5OH")') as number).toBeCloseTo(40, 12);
    expect(evaluate('=MIXGAP.MOLARMASS("H2O")')).toBe(2 * 1.008 + 15.999);
    expect(evaluate('=MIXGAP.MASSFRAC(0.5, 1, 3)')).toBe(0.75);
    expect(evaluate('=MIXGAP.MOLEFRAC(0.75, 1, 3)')).toBe(0.5);
  });

  it('phase masses for a batch', () => {
    const f = evaluate('=MIXGAP.PHASEMASSFRAC(0.1, 0.03, 0.3, "H2O", "C6H5OH")') as number;
    expect(evaluate('=MIXGAP.PHASEMASS(250, 0.1, 0.03, 0.3, "H2O", "C6H5OH")')).toBe(250 * f);
    expect(evaluate('=MIXGAP.PHASEMASSFRAC(0.1, 0.03, 0.3, "H2O", "C6H5OH", "low")')).toBe(1 - f);
  });

  it('says what to fix', () => {
    expect(evaluate('=MIXGAP.MASSFRAC(0.5, "Qq", "Fe")')).toEqual({ error: '#VALUE!', message: expect.stringMatching(/"Qq" is not an element symbol/) });
    expect(evaluate('=MIXGAP.MASSFRAC(0.5, -3, "Fe")')).toEqual({ error: '#NUM!', message: expect.stringMatching(/A = -3: a molar mass must be a positive number/) });
    expect(evaluate('=MIXGAP.WTPCT(120, "Al", "Cu")')).toEqual({ error: '#NUM!', message: expect.stringMatching(/molPercent = 120 must lie between 0 and 100/) });
  });
});

describe('the README worked example (invented data) shows what the functions return', () => {
  // Numbers as printed in README.md, "From measurements to parameters"; each check allows the
  // rounding of the printed digits.
  const wt = [[293.15, 3.8, 95.1], [313.15, 6.7, 91.8], [328.15, 11.2, 87.2], [338.15, 14.6, 82.6]];
  it('coefficients, summary, critical point and batch split', () => {
    const x = (w: number) => evaluate(`=MIXGAP.MOLEFRAC(${w / 100}, 58, 102)`) as number;
    const rows = wt.map(([T, w1, w2]) => [T, x(w1), x(w2)]);
    const data = arrayOf(rows);
    const params = () => arrayOf(evaluate(`=MIXGAP.FITTIELINES(${data}, 2, {TRUE,FALSE})`) as number[][]);
    const coef = evaluate(`=MIXGAP.FITTIELINES(${data}, 2, {TRUE,FALSE})`) as number[][];
    expect(Math.abs(coef[0][0] - 19984)).toBeLessThan(0.5);
    expect(Math.abs(coef[0][1] + 39.977)).toBeLessThan(0.0005);
    expect(Math.abs(coef[1][0] - 1496.9)).toBeLessThan(0.05);
    expect(evaluate(`=MIXGAP.FITINFO(${data}, 2, {TRUE,FALSE})`)).toBe(
      '2 terms, 3 coefficients from 4 tie-lines (8 equations); 5 degrees of freedom; rms composition residual 0.00259; condition number 2.68');
    const p = params();
    expect(Math.abs((evaluate(`=MIXGAP.TCRIT(${p})`) as number) - 366.2)).toBeLessThan(0.05);
    expect(Math.abs((evaluate(`=MIXGAP.XCRIT(${p})`) as number) - 0.3481)).toBeLessThan(0.00005);
    const residuals = rows.flatMap(([T, x1, x2]) => [
      evaluate(`=MIXGAP.GAPRESID(${T}, ${x1}, ${p}, "low")`) as number,
      evaluate(`=MIXGAP.GAPRESID(${T}, ${x2}, ${p}, "high")`) as number,
    ]);
    expect(Math.abs(residuals[0] + 0.0009)).toBeLessThan(0.00005);
    expect(Math.abs(residuals[1] - 0.0041)).toBeLessThan(0.00005);
    expect(Math.max(...residuals.map(Math.abs))).toBeLessThan(0.00415);
    const mass = evaluate(`=MIXGAP.PHASEMASS(1000, MIXGAP.MOLEFRAC(0.4, 58, 102), MIXGAP.GAPLOW(313.15, ${p}), MIXGAP.GAPHIGH(313.15, ${p}), 58, 102)`) as number;
    expect(Math.abs(mass - 390.9)).toBeLessThan(0.05);
  });
});
