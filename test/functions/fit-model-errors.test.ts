/**
 * FITMODEL and its siblings on bad input: each gives the right error code with a message that
 * says what to fix (the row, the key), never a number. Then the same functions through the
 * embedded engine: spill sizes from the formula text, padding, a fitted card nested as params.
 */
import { readFileSync } from 'fs';
import path from 'path';
import { describe, expect, it } from 'vitest';
import { R } from '../../src/core/constants';
import { fitCov, fitModel, fitResid, fitSummary } from '../../src/functions/index';
import { buildMixgapEngine } from '../../src/hosts/mixgap-engine';
import { evaluateIn } from './support/evaluate';
import { failure } from './support/failure';

/** The symmetric regular-solution boundary: T at which x is on the binodal (see fit-model.test.ts). */
const regularT = (omega: number, x: number) => (omega * (1 - 2 * x)) / (R * Math.log((1 - x) / x));

const regular = [['model', 'regular'], ['omega', '', 'fit']];
const good = [0.05, 0.1, 0.2].map((x) => ['tie-line', regularT(20000, x), x, 1 - x]);
const err = (call: () => unknown) => {
  const f = failure(call);
  return `${f.code} ${f.message}`;
};

describe('start card', () => {
  const cases: Array<[string, unknown[][], RegExp]> = [
    ['no model', [['omega', 1, 'fit']], /^#VALUE! start card: no "model" key: add a row model \| regular, redlich-kister/],
    ['an unknown model', [['model', 'ideal'], ['omega', 1, 'fit']], /^#VALUE! start card: model "ideal" is unknown/],
    ['a key of another model', [['model', 'regular'], ['omega', 1, 'fit'], ['NA', 1]], /^#VALUE! start card: "NA" belongs to a flory-huggins model, not to this regular one/],
    ['a misspelled key', [['model', 'nrtl'], ['a12', 1, 'fit'], ['b21', 1, 'fit'], ['alfa', 0.3]], /^#VALUE! start card: unknown key "alfa" \(row 4\): the nrtl model's parameters are a12, b12, a21, b21, alpha/],
    ['a fixed parameter without a value', [['model', 'fh'], ['NA', '', 'fixed'], ['NB', 10], ['chi.B', '', 'fit']], /^#VALUE! start card: "NA" has no value: give its value, or write "fit" beside it/],
    ['no parameter marked fit', [['model', 'regular'], ['omega', 20000]], /^#VALUE! start card: no parameter is marked "fit"/],
    ['a word that is neither fit nor fixed', [['model', 'regular'], ['omega', 20000, 'free']], /^#VALUE! the third cell of "omega" = "free": write "fit" \(the fit moves it\) or "fixed"/],
    ['a fourth cell', [['model', 'regular'], ['omega', 20000, 'fit', 'x']], /^#VALUE! start card: row 2 has more than three cells/],
    ['a key twice', [['model', 'regular'], ['omega', 20000, 'fit'], ['Omega', 1]], /^#VALUE! start card: the key "omega" appears twice/],
    ['text for a number', [['model', 'regular'], ['omega', 'big', 'fit']], /^#VALUE! start card: "omega" must be a number \(got "big"\)/],
    ['fit beside a unit', [['model', 'regular'], ['omega', 20, 'fit'], ['energy', 'kJ/mol', 'fit']], /^#VALUE! start card: "energy" is not a parameter/],
    ['an unknown unit', [['model', 'regular'], ['omega', 20, 'fit'], ['energy', 'kJ']], /^#VALUE! start card: energy unit "kJ" is not one Mixgap reads/],
  ];
  for (const [name, start, message] of cases) it(name, () => expect(err(() => fitModel(start, good))).toMatch(message));

  it('a fitted card used again as a start: its u() and r() rows are skipped', () => {
    const card = fitModel([['model', 'rk'], ['L0', '', 'fit'], ['L1', 100, 'fit']], [...good, ['tie-line', regularT(20000, 0.3), 0.3, 0.7]]) as unknown[][];
    expect(card.some((r) => r[0] === 'r(L0, L1)')).toBe(true);
    const again = card.map((r) => (r[0] === 'L0' || r[0] === 'L1' ? [...r, 'fit'] : r));
    const refit = fitModel(again, [...good, ['tie-line', regularT(20000, 0.3), 0.3, 0.7]]) as unknown[][];
    // started at the optimum: the same optimum to the fit's step tolerance (1e-10 of the scale R T ~ 7000 J/mol)
    expect(Math.abs((refit[1][1] as number) - (card[1][1] as number))).toBeLessThan(1e-5);
  });
});

describe('data table: the row and what to fix', () => {
  const cases: Array<[string, unknown[][], RegExp]> = [
    ['an unknown kind', [...good, ['solubility', 300, 0.1]], /^#VALUE! data row 4: the first cell holds "solubility": write the kind of measurement, "tie-line" \(T, x', x''\), "boundary"/],
    ['an empty kind', [...good, ['', 300, 0.1]], /^#VALUE! data row 4: the first cell is empty/],
    ['a missing x\'\'', [...good, ['tie-line', 300, 0.1]], /^#VALUE! data row 4 \(tie-line\): x'' \(column 4\) is empty; a tie-line row is tie-line \| T, x', x''/],
    ['x\' above x\'\'', [['tie-line', 800, 0.9, 0.1]], /^#NUM! data row 1: x' = 0.9 must be below x'' = 0.1/],
    ['a composition outside (0, 1)', [['boundary', 800, 1.2, 'low']], /^#NUM! data row 1: x = 1.2 must be a fraction strictly between 0 and 1/],
    ['a cloud point written x0 first', [['cloud point', 0.3, 650]], /^#NUM! data row 1: x0 = 650 must be a fraction strictly between 0 and 1 \(a cloud point row is cloud point \| T, x0\)/],
    ['a side that is not low or high', [['boundary', 800, 0.1, 'left']], /^#VALUE! data row 1: the side \(column 4\) = "left": write "low"/],
    ['text for a temperature', [['cloud point', 'hot', 0.3]], /^#VALUE! data row 1 \(cloud point\): T \(column 2\) holds "hot"/],
    ['a temperature below absolute zero', [['critical point', -5]], /^#NUM! data row 1: Tc = -5 K is not above absolute zero/],
    ['a cell in the unused column of a cloud point', [['cloud point', 650, 0.3, 0.01]], /^#VALUE! data row 1: column 4 holds 0.01, but a cloud point row is cloud point \| T, x0 \| \| uncertainty: leave column 4 empty/],
    ['a zero uncertainty', [['cloud point', 650, 0.3, '', 0]], /^#NUM! data row 1: the uncertainty of T \(column 5\) is 0: give a number above 0/],
    ['an uncertainty of xc without xc', [['critical point', 650, '', '', 1, 0.01]], /^#VALUE! data row 1: column 6 gives the uncertainty of xc, but the row has no xc/],
    ['cells beyond the last column', [['tie-line', 800, 0.1, 0.9, 0.01, 5]], /^#VALUE! data row 1 has cells beyond column 5/],
    ['no measurements at all', [['kind', 'T', 'x']], /^#VALUE! data holds no measurements/],
  ];
  for (const [name, data, message] of cases) it(name, () => expect(err(() => fitModel(regular, data))).toMatch(message));

  it('a title row and empty rows are skipped, and FITRESID keeps the rows where they are', () => {
    const data = [['kind', 'T', 'x1', 'x2', 'u'], ...good.slice(0, 2), [null, null], good[2]];
    const resid = fitResid(regular, data) as unknown[][];
    expect(resid).toHaveLength(5);
    expect(resid[0]).toEqual(['', '']);
    expect(resid[3]).toEqual(['', '']);
    // exact closed-form data: residuals at the fit's rounding (1e-9 in composition)
    for (const i of [1, 2, 4]) expect(Math.abs(resid[i][0] as number)).toBeLessThan(1e-9);
  });

  it('temperatures in the card\'s unit: a °C card reads °C rows', () => {
    const card = fitModel([...regular, ['temperature', '°C']], good.map((r) => [r[0], (r[1] as number) - 273.15, r[2], r[3]]), undefined, false) as unknown[][];
    // the same closed-form data in °C: omega back to the fit's tolerance (1e-7 relative, as in fit-model.test.ts)
    expect(Math.abs((card[1][1] as number) / 20000 - 1)).toBeLessThan(1e-7);
  });
});

describe('fits that cannot give an answer', () => {
  it('too few data: #VALUE!, how many for how many', () => {
    expect(err(() => fitModel([['model', 'rk'], ['L0', '', 'fit'], ['L0.b', '', 'fit']], [['boundary', 800, 0.1, 'low']]))).toMatch(/^#VALUE! 1 measured quantities cannot determine 2 free parameters \(L0, L0\.b\): fix some parameters or add measurements/);
  });
  it('a parameter the data do not determine: #VALUE!, which and why', () => {
    // two boundaries at one temperature cannot separate a constant part from a slope
    expect(err(() => fitSummary([['model', 'rk'], ['L0', 20000, 'fit'], ['L0.b', '', 'fit']], [['boundary', 800, 0.1, 'low'], ['boundary', 800, 0.9, 'high']]))).toMatch(/^#VALUE! the data cannot tell (L0 and L0\.b|L0\.b and L0) apart .*fix one of them at a value, or add measurements at other temperatures/);
    // chi = chi.A + chi.B / T seen at one temperature only (two boundaries of a polymer solution at 300 K)
    expect(err(() => fitModel([['model', 'fh'], ['NA', 1], ['NB', 50], ['chi.A', 0.3, 'fit'], ['chi.B', 150, 'fit']], [['boundary', 300, 0.01, 'low'], ['boundary', 300, 0.3, 'high']]))).toMatch(/^#VALUE! the data cannot tell (chi\.A and chi\.B|chi\.B and chi\.A) apart/);
  });
  it('a start whose model has none of the measured gaps: #N/A', () => {
    expect(err(() => fitModel([['model', 'regular'], ['omega', 1000, 'fit']], good))).toMatch(/^#N\/A the starting parameters give no model with the measured gaps/);
  });
  it('a best fit at the edge of what the model can describe: #NUM!, did not converge, which feature', () => {
    // a boundary at 1000 K asks for Tc >= 1000 K, a critical point at 500 K pulls Tc down: the
    // least-squares minimum sits where the gap at 1000 K vanishes
    expect(err(() => fitModel(regular, [['boundary', 1000, 0.3, 'low'], ['critical point', 500]]))).toMatch(/^#NUM! did not converge: the fit ran into the edge of what the model can describe: moving omega .* \(the model has no miscibility gap at T = 1000 K, where a boundary was measured\)/);
  });
  it('an exactly determined fit has no uncertainty: #N/A for the u() rows, a card without them', () => {
    const data = [['critical point', 650]];
    expect(err(() => fitModel(regular, data))).toMatch(/^#N\/A the data determine the 1 fitted parameter exactly .* or FALSE as its 4th argument/);
    expect(err(() => fitCov(regular, data))).toMatch(/^#N\/A the data determine the 1 fitted parameter exactly/);
    expect((fitModel(regular, data, undefined, false) as unknown[][]).map((r) => r[0])).toEqual(['model', 'omega', 'energy', 'temperature']);
    expect(fitSummary(regular, data)).toMatch(/^regular: omega = [\d.]+ J\/mol; 1 measurement, 1 residual, 1 fitted parameter, 0 degrees of freedom; exactly determined \(no residual to judge the fit by or to estimate uncertainties from\)/);
  });
  it('"absolute" weights need every row\'s uncertainty', () => {
    expect(err(() => fitModel(regular, [[...good[0], 0.01], good[1]], 'absolute'))).toMatch(/^#VALUE! data row 2 states no uncertainty: with weights "absolute" every row needs one/);
    expect(err(() => fitModel(regular, good, 'weighted'))).toMatch(/^#VALUE! weights = "weighted": write "relative" .* or "absolute"/);
  });
  it('sizes that do not fit the card or the data', () => {
    expect(err(() => fitModel(regular, good, undefined, true, 3))).toMatch(/^#VALUE! the fitted card has 5 rows but rows = 3: write 5 or more as the 5th argument/);
    expect(err(() => fitResid(regular, good, 2))).toMatch(/^#VALUE! rows = 2, but data has 3 rows: write 3 or more/);
    expect(err(() => fitCov(regular, good, undefined, 2))).toMatch(/^#VALUE! free = 2, but the start card marks 1 parameter "fit" \(omega\): write 1/);
    expect(err(() => fitModel(regular, good, undefined, 'yes' as unknown as boolean))).toMatch(/^#VALUE! uncertainty = "yes": write TRUE or FALSE/);
  });
});

describe('through the embedded engine', () => {
  const root = path.join(__dirname, '..', '..');
  const metadata = JSON.parse(readFileSync(path.join(root, 'dist', 'functions.json'), 'utf8'));
  const inline = (rows: unknown[][]) => `{${rows.map((r) => r.map((v) => (typeof v === 'string' ? `"${v}"` : String(v))).join(',')).join(';')}}`;
  const start = inline([['model', 'regular', ''], ['omega', '', 'fit']]);
  const data = inline(good);
  /** How many rows the engine reserves for a formula's spill (evaluateIn leaves out trailing empty rows). */
  const spillRows = (formula: string) => {
    const engine = buildMixgapEngine(metadata);
    try {
      const sheet = engine.getSheetId(engine.addSheet())!;
      engine.setCellContents({ sheet, row: 0, col: 0 }, [[formula]]);
      let n = 0;
      while (engine.isCellPartOfArray({ sheet, row: n, col: 0 })) n++;
      return n;
    } finally {
      engine.destroy();
    }
  };

  it('FITMODEL spills 24 x 2 by default, the card then empty cells, and a card nested as params works', () => {
    const [card, sized, tc, low] = evaluateIn(metadata, [
      `=MIXGAP.FITMODEL(${start}, ${data})`,
      `=MIXGAP.FITMODEL(${start}, ${data}, , FALSE, 4)`,
      `=MIXGAP.TCRIT(MIXGAP.FITMODEL(${start}, ${data}, , FALSE))`,
      `=MIXGAP.GAPLOW(${good[0][1]}, MIXGAP.FITMODEL(${start}, ${data}, , FALSE))`,
    ]) as unknown[];
    const rows = card as unknown[][];
    expect(rows.map((r) => r[0])).toEqual(['model', 'omega', 'energy', 'temperature', 'u(omega)']);
    expect(spillRows(`=MIXGAP.FITMODEL(${start}, ${data})`)).toBe(24);
    expect(spillRows(`=MIXGAP.FITMODEL(${start}, ${data}, , FALSE, 4)`)).toBe(4);
    expect((sized as unknown[][]).map((r) => r[0])).toEqual(['model', 'omega', 'energy', 'temperature']);
    // 17-digit literals of closed-form data: Tc = Omega / 2R (Porter, Easterling & Sherif 2009, ch. 1)
    // to the fit's 1e-7, and the first tie-line's x' back to 1e-6 (as in fit-model.test.ts)
    expect(Math.abs((tc as number) - 20000 / (2 * R))).toBeLessThan(1e-7 * 1203);
    expect(Math.abs((low as number) - 0.05)).toBeLessThan(1e-6);
  });

  it('FITRESID and FITCOV need their sizes in the formula; FITSUMMARY is one cell', () => {
    const [resid, noRows, cov, noFree, summary] = evaluateIn(metadata, [
      `=MIXGAP.FITRESID(${start}, ${data}, 4)`,
      `=MIXGAP.FITRESID(${start}, ${data})`,
      `=MIXGAP.FITCOV(${start}, ${data}, , 1)`,
      `=MIXGAP.FITCOV(${start}, ${data})`,
      `=MIXGAP.FITSUMMARY(${start}, ${data})`,
    ]) as unknown[];
    expect(resid as unknown[][]).toHaveLength(3);
    expect(spillRows(`=MIXGAP.FITRESID(${start}, ${data}, 4)`)).toBe(4);
    const first = (v: unknown) => (Array.isArray(v) ? (v as unknown[][])[0][0] : v);
    expect(first(noRows)).toEqual({ error: '#VALUE!', message: expect.stringMatching(/^FITRESID: write the number of rows \(3rd argument\) as a number in the formula/) });
    expect((cov as unknown[][])[0]).toEqual(['', 'omega']);
    expect(first(noFree)).toEqual({ error: '#VALUE!', message: expect.stringMatching(/^FITCOV: write the number of free parameters \(4th argument\) as a number/) });
    expect(summary).toMatch(/^regular: omega = /);
  });
});
