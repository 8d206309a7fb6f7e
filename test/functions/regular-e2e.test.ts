/**
 * End to end for Redlich–Kister systems: the same formula text through `mixgap eval --json`
 * (the built command), through the embedded engine in-process, and the core called directly must
 * give the same numbers; the regular-solution cases are also checked against closed forms.
 * Cases: regular, asymmetric, temperature-dependent, closed loop, two gaps, very dilute.
 */
import { spawnSync } from 'child_process';
import { readFileSync } from 'fs';
import path from 'path';
import { describe, expect, test, vi } from 'vitest';
import * as binodal from '../../src/core/binodal';
import { criticalPoints } from '../../src/core/critical';
import { R } from '../../src/core/constants';
import { gapTemperature } from '../../src/core/gapTemperature';
import { redlichKister, regularSolution, type RedlichKisterTerm } from '../../src/core/models/redlichKister';
import { evaluateFormulas } from '../../src/hosts/evaluate';
import { buildMixgapEngine } from '../../src/hosts/mixgap-engine';
import * as cells from '../../src/functions/functions';

vi.mock('../../src/core/binodal', async (importOriginal) => {
  const actual = await importOriginal<typeof import('../../src/core/binodal')>();
  return { ...actual, phaseMap: vi.fn(actual.phaseMap) };
});

const root = path.join(__dirname, '..', '..');
const metadata = JSON.parse(readFileSync(path.join(root, 'dist', 'functions.json'), 'utf8'));

function evalCli(formulas: string[]): unknown[] {
  const p = spawnSync(process.execPath, [path.join(root, 'bin', 'mixgap.js'), 'eval', '--json'], {
    input: formulas.join('\n') + '\n', encoding: 'utf8', cwd: root,
  });
  expect(p.status, p.stderr).toBe(0);
  return JSON.parse(p.stdout);
}

function evalEngine(formulas: string[]): unknown[] {
  const engine = buildMixgapEngine(metadata);
  try {
    return evaluateFormulas(engine, formulas);
  } finally {
    engine.destroy();
  }
}

const literal = (terms: RedlichKisterTerm[]) => `{${terms.map((t) => `${t.a},${t.b},${t.c}`).join(';')}}`;

/** The regular-solution binodal from its closed form, by bisection in ln x (independent of src). */
function regularBinodal(omega: number, T: number): number {
  // Porter, Easterling & Sherif, Phase Transformations in Metals and Alloys, 3rd ed. (2009), ch. 1;
  // Hillert, Phase Equilibria, Phase Diagrams and Phase Transformations, 2nd ed. (2008):
  // ln[x/(1-x)] = Omega (2x - 1) / (R T) on the A-rich side
  let lo = Math.log(1e-300), hi = Math.log(0.5 - 1e-12);
  const f = (lx: number) => { const x = Math.exp(lx); return lx - Math.log1p(-x) - (omega * (2 * x - 1)) / (R * T); };
  for (let i = 0; i < 200; i++) { const m = 0.5 * (lo + hi); if (f(m) < 0) lo = m; else hi = m; }
  return Math.exp(0.5 * (lo + hi));
}

interface Case {
  name: string;
  terms: RedlichKisterTerm[];
  T: number;
}

const cases: Case[] = [
  { name: 'regular', terms: [{ a: 21000, b: 0, c: 0 }], T: 800 },
  { name: 'asymmetric', terms: [{ a: 18000, b: 0, c: 0 }, { a: 4000, b: 0, c: 0 }], T: 900 },
  { name: 'temperature-dependent', terms: [{ a: 26000, b: -6, c: 0 }, { a: 2500, b: 1.5, c: 0 }, { a: 1200, b: 0, c: 0 }], T: 700 },
  { name: 'closed loop', terms: [{ a: -30000, b: 270, c: -30 }], T: 1500 },
  { name: 'two gaps', terms: [{ a: -5000, b: 0, c: 0 }, { a: 0, b: 0, c: 0 }, { a: 60000, b: 0, c: 0 }], T: 600 },
  { name: 'very dilute', terms: [{ a: 60000, b: 0, c: 0 }], T: 300 },
];

describe.each(cases)('$name', ({ terms, T }) => {
  const model = redlichKister(terms);
  const map = binodal.phaseMap(model.at(T));
  const crit = criticalPoints(model);
  const p = literal(terms);
  const formulas: string[] = [];
  const expected: number[] = [];
  map.gaps.forEach((g, i) => {
    formulas.push(`=MIXGAP.GAPLOW(${T}, ${p}, ${i + 1})`, `=MIXGAP.GAPHIGH(${T}, ${p}, ${i + 1})`);
    expected.push(g.low.x, g.high.x);
  });
  for (let i = 0; i < map.spinodal.length / 2; i++) {
    formulas.push(`=MIXGAP.SPINLOW(${T}, ${p}, ${i + 1})`, `=MIXGAP.SPINHIGH(${T}, ${p}, ${i + 1})`);
    expected.push(map.spinodal[2 * i].x, map.spinodal[2 * i + 1].x);
  }
  crit.forEach((c, i) => {
    formulas.push(`=MIXGAP.TCRIT(${p}, ${i + 1})`, `=MIXGAP.XCRIT(${p}, ${i + 1})`);
    expected.push(c.T, c.x);
  });
  formulas.push(`=MIXGAP.GAPCOUNT(${T}, ${p})`);
  expected.push(map.gaps.length);

  test('the core finds what the case is meant to show', () => {
    expect(map.gaps.length).toBeGreaterThan(0);
    if (terms.length === 3 && terms[0].a === -5000) expect(map.gaps).toHaveLength(2);
    if (terms[0].c !== 0) expect(crit.map((c) => c.kind)).toEqual(['upper', 'lower']);
  });

  // The command and the engine run the same implementation on the same doubles: equal to the bit.
  test('mixgap eval --json gives the core values', () => {
    expect(evalCli(formulas)).toEqual(expected);
  });

  test('the embedded engine gives the core values', () => {
    expect(evalEngine(formulas)).toEqual(expected);
  });
});

describe('closed forms through the command', () => {
  test('regular solution: binodal, spinodal, critical point and gap temperature', () => {
    const omega = 21000, T = 800;
    const got = evalCli([
      `=MIXGAP.GAPLOW(${T}, ${omega})`, `=MIXGAP.GAPHIGH(${T}, ${omega})`,
      `=MIXGAP.SPINLOW(${T}, ${omega})`, `=MIXGAP.TCRIT(${omega})`, `=MIXGAP.XCRIT(${omega})`,
      `=MIXGAP.TGAP(0.3, ${omega})`,
    ]) as number[];
    const x = regularBinodal(omega, T);
    // Porter et al. (2009) ch. 1: spinodal x(1-x) = RT/(2 Omega); Tc = Omega/(2R), xc = 1/2
    const s = 0.5 - Math.sqrt(0.25 - (R * T) / (2 * omega));
    // Relative 1e-12: the bisection above ends at the last bits of ln x; the cancellation in
    // 1 - 2x at x near 1/2 does not arise at these compositions.
    expect(Math.abs(got[0] - x) / x).toBeLessThan(1e-12);
    expect(Math.abs(got[1] - (1 - x))).toBeLessThan(1e-12);
    expect(Math.abs(got[2] - s) / s).toBeLessThan(1e-12);
    expect(Math.abs(got[3] - omega / (2 * R)) / (omega / (2 * R))).toBeLessThan(1e-12);
    expect(got[4]).toBeCloseTo(0.5, 12);
    // Gap temperature from the binodal solved for T: T = Omega (2 x0 - 1) / (R ln[x0 / (1 - x0)]).
    // 1e-10 relative: TGAP bisects T to 1e-13 and the formula loses a few digits in 2 x0 - 1.
    const Tgap = (omega * (2 * 0.3 - 1)) / (R * Math.log(0.3 / 0.7));
    expect(Math.abs(got[5] - Tgap) / Tgap).toBeLessThan(1e-10);
  });

  test('a boundary near 4e-11 keeps its digits (Omega = 60000 J/mol at 300 K)', () => {
    const [x] = evalCli(['=MIXGAP.GAPLOW(300, 60000)']) as number[];
    const want = regularBinodal(60000, 300);
    // relative 1e-8 is the issue's bound; the solver works in ln[x/(1-x)] and does far better
    expect(Math.abs(x - want) / want).toBeLessThan(1e-8);
    expect(x).toBeLessThan(1e-10);
  });

  test('the gap temperature of a returned boundary gives back its temperature', () => {
    const model = regularSolution(18000);
    const T = 650;
    const x = binodal.phaseMap(model.at(T)).gaps[0].low.x;
    const back = gapTemperature(model, x, criticalPoints(model));
    // The boundary moves by dx/dT per kelvin; 1e-9 relative covers the last bits of x
    expect(Math.abs(back - T) / T).toBeLessThan(1e-9);
  });
});

describe('one solve per temperature', () => {
  test('GAPLOW, GAPHIGH, SPINLOW and PHASEFRAC of one row share one solve', () => {
    const solve = vi.mocked(binodal.phaseMap);
    const p = [[19876, -1.25, 0], [1234, 0, 0]];
    const T = 712.125;
    solve.mockClear();
    cells.gapLow(T, p);
    cells.gapHigh(T, p);
    cells.spinLow(T, p);
    cells.phaseFrac(0.4, T, p);
    cells.driveForce(0.4, T, p);
    expect(solve).toHaveBeenCalledTimes(1);
    // a new temperature is a new solve
    cells.gapLow(T + 1, p);
    expect(solve).toHaveBeenCalledTimes(2);
  });
});
