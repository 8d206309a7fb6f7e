/**
 * Flory–Huggins and NRTL cards typed into formulas (inline arrays such as
 * {"model","nrtl";"b12",800;...}) give, through the embedded formula engine and through
 * `mixgap eval --json`, exactly what the cell functions and the core give: binodal, spinodal,
 * critical points, gap temperature, gap table, activities, chemical potentials, driving force.
 * The engine only hands arguments over and results back (smartRounding off), and a solve gives
 * the same bits whatever was solved before it (test/functions/order-independence.test.ts), so
 * numbers must come through bit-exact.
 */
import { spawnSync } from 'child_process';
import { existsSync } from 'fs';
import path from 'path';
import { beforeAll, describe, expect, it } from 'vitest';
import type { HyperFormula } from 'hyperformula';
import { activities, decompositionGain, drivingForce } from '../../src/core/activity';
import { phaseMap, type PhaseMap } from '../../src/core/binodal';
import { criticalPoints } from '../../src/core/critical';
import { forgetSolves } from '../../src/core/equilibrium';
import type { BinaryModel, Isotherm } from '../../src/core/model';
import { floryHuggins } from '../../src/core/models/floryHuggins';
import { nrtl } from '../../src/core/models/nrtl';
import * as fns from '../../src/functions/functions';
import { CellFailure } from '../../src/functions/errors';
import { evaluateFormulas, type FormulaResult } from '../../src/hosts/evaluate';
import { buildMixgapEngine } from '../../src/hosts/mixgap-engine';
import { generatedMetadata, inlineArray as inline } from './support/evaluate';

const root = path.join(__dirname, '..', '..');

let engine: HyperFormula;
beforeAll(async () => {
  const metadata = await generatedMetadata();
  engine = buildMixgapEngine(metadata);
});

type Cell = string | number | boolean | null;

// NRTL: tau12 = 800/T, tau21 = 500/T, alpha = 0.2 (an upper critical point near 567 K)
const NRTL_CARD: Cell[][] = [['model', 'nrtl'], ['b12', 800], ['b21', 500], ['alpha', 0.2], ['name A', 'water'], ['name B', 'oil']];
const NRTL_P = { a12: 0, b12: 800, a21: 0, b21: 500, alpha: 0.2 };
// Flory–Huggins: polymer B (N = 100) in solvent A, chi = 0.2 + 150/T (upper critical point near 370 K)
const FH_CARD: Cell[][] = [['model', 'flory-huggins'], ['NA', 1], ['NB', 100], ['chi.A', 0.2], ['chi.B', 150]];
const FH_P = { NA: 1, NB: 100, A: 0.2, B: 150 };
// The NRTL card in °C and kJ/mol
const NRTL_C_CARD: Cell[][] = [...NRTL_CARD, ['temperature', '°C'], ['energy', 'kJ/mol']];

/** One check: the formula text, the direct call of the same cell function, the core's value (if any). */
interface Check {
  formula: string;
  direct: () => unknown;
  core?: number;
}

function checksFor(card: Cell[][], T: number, xs: number[]): Check[] {
  const c = inline(card);
  const p = card as any;
  return [
    { formula: `=MIXGAP.GAPCOUNT(${T}, ${c})`, direct: () => fns.gapCount(T, p) },
    { formula: `=MIXGAP.GAPLOW(${T}, ${c})`, direct: () => fns.gapLow(T, p) },
    { formula: `=MIXGAP.GAPHIGH(${T}, ${c})`, direct: () => fns.gapHigh(T, p) },
    { formula: `=MIXGAP.SPINLOW(${T}, ${c})`, direct: () => fns.spinLow(T, p) },
    { formula: `=MIXGAP.SPINHIGH(${T}, ${c})`, direct: () => fns.spinHigh(T, p) },
    { formula: `=MIXGAP.TCRIT(${c})`, direct: () => fns.tCrit(p) },
    { formula: `=MIXGAP.XCRIT(${c})`, direct: () => fns.xCrit(p) },
    { formula: `=MIXGAP.CRITKIND(${c})`, direct: () => fns.critKind(p) },
    { formula: `=MIXGAP.CRITCOUNT(${c})`, direct: () => fns.critCount(p) },
    { formula: `=MIXGAP.TGAP(${xs[1]}, ${c})`, direct: () => fns.tGap(xs[1], p) },
    { formula: `=MIXGAP.PHASEFRAC(${xs[1]}, ${T}, ${c}, "low")`, direct: () => fns.phaseFrac(xs[1], T, p, 'low') },
    { formula: `=MIXGAP.GAPTABLE(${T}, ${T + 60}, 4, ${c})`, direct: () => fns.gapTable(T, T + 60, 4, p) },
    { formula: `=MIXGAP.CHECKCARD(${c})`, direct: () => fns.checkCard(p) },
    ...xs.flatMap((x): Check[] => [
      { formula: `=MIXGAP.GMIX(${x}, ${T}, ${c})`, direct: () => fns.gMix(x, T, p) },
      { formula: `=MIXGAP.ACTIVITY(${x}, ${T}, ${c}, "A")`, direct: () => fns.activity(x, T, p, 'A') },
      { formula: `=MIXGAP.ACTIVITY(${x}, ${T}, ${c})`, direct: () => fns.activity(x, T, p) },
      { formula: `=MIXGAP.ACTCOEF(${x}, ${T}, ${c}, "B")`, direct: () => fns.actCoef(x, T, p, 'B') },
      { formula: `=MIXGAP.CHEMPOT(${x}, ${T}, ${c}, "A")`, direct: () => fns.chemPot(x, T, p, 'A') },
      { formula: `=MIXGAP.GEXCESS(${x}, ${T}, ${c})`, direct: () => fns.gExcess(x, T, p) },
      { formula: `=MIXGAP.DRIVEFORCE(${x}, ${T}, ${c})`, direct: () => fns.driveForce(x, T, p) },
      { formula: `=MIXGAP.DECOMPGAIN(${x}, ${T}, ${c})`, direct: () => fns.decompGain(x, T, p) },
    ]),
  ];
}

/** What a cell shows for a direct call: its value (a 2-D array for a table), or the error object. */
function shown(f: () => unknown): unknown {
  try {
    const v = f();
    if (Array.isArray(v)) return v.map((row: unknown[]) => row.map((c) => (c instanceof CellFailure ? { error: c.code, message: c.message } : c)));
    return v;
  } catch (e) {
    if (e instanceof CellFailure) return { error: e.code, message: e.message };
    throw e;
  }
}

/** Equal numbers bit for bit (Object.is: 0 and -0 differ), equal anything else. */
function expectSame(got: unknown, want: unknown, what: string): void {
  if (typeof want === 'number' && typeof got === 'number') {
    if (!Object.is(got, want)) expect.fail(`${what}: got ${got}, want ${want}`);
    return;
  }
  if (Array.isArray(want) && Array.isArray(got)) {
    expect(got.length, what).toBe(want.length);
    want.forEach((w, i) => expectSame(got[i], w, `${what} [${i}]`));
    return;
  }
  expect(got, what).toEqual(want);
}

const SYSTEMS = [
  { name: 'NRTL card', card: NRTL_CARD, T: 350, xs: [0.02, 0.3, 0.93] },
  { name: 'Flory–Huggins card', card: FH_CARD, T: 320, xs: [0.0005, 0.1, 0.5] },
  { name: 'NRTL card in °C and kJ/mol', card: NRTL_C_CARD, T: 76.85, xs: [0.02, 0.3, 0.93] },
];

describe('the embedded engine gives what the cell functions give', () => {
  for (const { name, card, T, xs } of SYSTEMS) {
    it(name, () => {
      const checks = checksFor(card, T, xs);
      forgetSolves();
      const want = checks.map((c) => shown(c.direct));
      forgetSolves();
      const got = evaluateFormulas(engine, checks.map((c) => c.formula));
      checks.forEach((c, i) => expectSame(got[i], want[i], c.formula));
      // nothing here is an error: every check returns a value
      for (const [i, w] of want.entries()) expect(typeof w === 'object' && w !== null && !Array.isArray(w), checks[i].formula).toBe(false);
    });
  }

  it('a card with a mistake shows #VALUE! with the card reader\'s message', () => {
    const bad = inline([['model', 'nrtl'], ['b12', 800], ['b21', 500]]);
    const got = evaluateFormulas(engine, [`=MIXGAP.GAPLOW(300, ${bad})`])[0] as { error: string; message: string };
    expect(got.error).toBe('#VALUE!');
    expect(got.message).toContain('"alpha"');
  });
});

describe('the engine gives the core\'s numbers', () => {
  // The core called directly, on the model built from the same parameters (no card, no cell).
  type Extra = (x: number, T: number, c: string, iso: Isotherm, map: PhaseMap, a: ReturnType<typeof activities>) => Array<[string, number]>;
  const cases: Array<{ name: string; model: BinaryModel; card: string; T: number; x: number; extra: Extra }> = [
    {
      name: 'NRTL card', model: nrtl(NRTL_P), card: inline(NRTL_CARD), T: 350, x: 0.3,
      extra: (x, T, c, iso, map, a) => [
        [`=MIXGAP.ACTIVITY(${x}, ${T}, ${c}, "water")`, Math.exp(a.lnA)],
        [`=MIXGAP.ACTIVITY(${x}, ${T}, ${c}, "oil")`, Math.exp(a.lnB)],
        [`=MIXGAP.CHEMPOT(${x}, ${T}, ${c}, "B")`, a.muB],
        [`=MIXGAP.DRIVEFORCE(${x}, ${T}, ${c})`, drivingForce(iso, map, x)],
        [`=MIXGAP.DECOMPGAIN(${x}, ${T}, ${c})`, decompositionGain(iso, map, x)],
      ],
    },
    {
      name: 'Flory–Huggins card', model: floryHuggins(FH_P), card: inline(FH_CARD), T: 320, x: 0.1,
      extra: (x, T, c, iso, map, a) => [
        [`=MIXGAP.ACTIVITY(${x}, ${T}, ${c}, "A")`, Math.exp(a.lnA)],
        [`=MIXGAP.ACTCOEF(${x}, ${T}, ${c}, "B")`, Math.exp(a.lnGammaB)],
        [`=MIXGAP.DRIVEFORCE(${x}, ${T}, ${c})`, drivingForce(iso, map, x)],
      ],
    },
  ];
  for (const { name, model, card: c, T, x, extra } of cases) {
    it(`${name}: binodal, spinodal, critical point, activities, driving force`, () => {
      const iso = model.at(T);
      const map = phaseMap(iso);
      const [cp] = criticalPoints(model);
      const pairs: Array<[string, number]> = [
        [`=MIXGAP.GAPLOW(${T}, ${c})`, map.gaps[0].low.x],
        [`=MIXGAP.GAPHIGH(${T}, ${c})`, map.gaps[0].high.x],
        [`=MIXGAP.SPINLOW(${T}, ${c})`, map.spinodal[0].x],
        [`=MIXGAP.SPINHIGH(${T}, ${c})`, map.spinodal[1].x],
        [`=MIXGAP.TCRIT(${c})`, cp.T],
        [`=MIXGAP.XCRIT(${c})`, cp.x],
        ...extra(x, T, c, iso, map, activities(model, T, x)),
      ];
      forgetSolves();
      const got = evaluateFormulas(engine, pairs.map(([f]) => f));
      pairs.forEach(([f, want], i) => expectSame(got[i], want, f));
    });
  }
});

describe('mixgap eval --json gives what the cell functions give', () => {
  const bin = path.join(root, 'bin', 'mixgap.js');

  it('the bundle is built', () => {
    expect(existsSync(path.join(root, 'dist', 'node', 'cli.js')), 'run `npm run build`').toBe(true);
  });

  it('NRTL and Flory–Huggins cards typed as inline arrays, one process for all formulas', () => {
    const checks = SYSTEMS.flatMap(({ card, T, xs }) => checksFor(card, T, xs));
    const p = spawnSync(process.execPath, [bin, 'eval', '--json', ...checks.map((c) => c.formula)], { encoding: 'utf8', cwd: root });
    expect(p.status, p.stderr).toBe(0);
    const got = JSON.parse(p.stdout) as FormulaResult[];
    expect(got).toHaveLength(checks.length);
    // JSON numbers are the shortest text that reads back as the same double: no rounding here
    forgetSolves();
    checks.forEach((c, i) => {
      const want = shown(c.direct);
      expect(typeof want === 'object' && want !== null && !Array.isArray(want), `${c.formula} is not an error`).toBe(false);
      expectSame(got[i], want, c.formula);
    });
  });
});
