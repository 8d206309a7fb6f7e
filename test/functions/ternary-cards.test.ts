/**
 * Ternary parameter cards (src/functions/ternaryCard.ts and the families in src/core/ternary): the
 * strictness rules of the binary card (misspelled, missing, duplicated or contradictory keys are
 * #VALUE! naming the key), and each edge of a ternary card being the binary card of that pair.
 */
import { describe, expect, it } from 'vitest';
import { readCard } from '../../src/functions/card';
import { CellFailure } from '../../src/functions/errors';
import { checkCard } from '../../src/functions/functions';
import { readTernaryCard } from '../../src/functions/ternaryCard';

type Row = [string, string | number];
const RK: Row[] = [['model', 'redlich-kister'], ['AB.L0', 12000], ['AB.L1', 1500], ['AC.L0', 3000], ['BC.L0', 9000], ['BC.L0.b', -2], ['energy', 'J/mol']];
const NRTL: Row[] = [
  ['model', 'nrtl'], ['AB.b12', 800], ['AB.b21', 500], ['AB.alpha', 0.2],
  ['AC.a12', 0.5], ['AC.a21', 0.1], ['AC.alpha', 0.3], ['BC.b12', -100], ['BC.b21', 200], ['BC.alpha', 0.3],
];
const FH: Row[] = [['model', 'fh'], ['NA', 1], ['NB', 1], ['NC', 200], ['AB.chi.A', 1.2], ['AC.chi.A', 0.9], ['BC.chi.B', 100]];

function failure(rows: unknown[][]): CellFailure {
  try {
    readTernaryCard(rows);
  } catch (e) {
    if (e instanceof CellFailure) return e;
    throw e;
  }
  throw new Error('the card was accepted');
}

describe('ternary cards: strictness', () => {
  it('reads the three families', () => {
    expect(readTernaryCard(RK).model.key).toContain('RK3');
    expect(readTernaryCard(NRTL).model.key).toContain('NRTL3');
    expect(readTernaryCard(FH).model.sites).toEqual([1, 1, 200]);
  });

  it('a misspelled key is #VALUE! naming it', () => {
    const f = failure([...RK, ['AB.L0.d', 1]]);
    expect(f.code).toBe('#VALUE!');
    expect(f.message).toContain('unknown key "AB.L0.d"');
    expect(failure([...NRTL, ['AB.alfa', 0.3]]).message).toContain('"AB.alfa"');
    expect(failure([...FH, ['AD.chi.A', 0.3]]).message).toContain('"AD.chi.A"');
  });

  it('a missing key is #VALUE! naming it', () => {
    expect(failure(RK.filter(([k]) => k !== 'AC.L0')).message).toContain('"AC.L0"');
    expect(failure(NRTL.filter(([k]) => k !== 'BC.alpha')).message).toContain('"BC.alpha"');
    expect(failure(FH.filter(([k]) => k !== 'NC')).message).toContain('"NC"');
    expect(failure([...RK, ['AB.L3', 1]]).message).toContain('"AB.L2" is missing');
    expect(failure([...RK, ['ABC.MA', 1]]).message).toContain('"ABC.MB" is missing');
  });

  it('a duplicated key is #VALUE! naming it, in any spelling', () => {
    const f = failure([...RK, ['ab.l0.a', 1]]);
    expect(f.code).toBe('#VALUE!');
    expect(f.message).toContain('"AB.L0" appears twice');
  });

  it('contradictory keys are #VALUE! naming both', () => {
    const f = failure([...RK, ['ABC.M', 1000], ['ABC.MA.b', 1]]);
    expect(f.message).toContain('"ABC.M"');
    expect(f.message).toContain('"ABC.MA.b"');
    expect(failure([...NRTL, ['AB.L0', 1]]).message).toContain('"AB.L0" belongs to a ternary redlich-kister card');
    expect(failure([...RK, ['name A', 'water'], ['name C', 'Water']]).message).toContain('different names');
    expect(failure([...RK, ['name B', 'c'], ['name C', 'solute']]).message).toContain('letter');
  });

  it('a binary card is refused by the ternary reader, and a ternary card by the binary one', () => {
    expect(failure([['model', 'regular'], ['omega', 20000]]).message).toContain('not a ternary card');
    expect(() => readCard(RK)).toThrow(/unknown key "AB.L0"/);
  });

  it('units apply to every pair: kJ/mol equals 1000 J/mol', () => {
    const kJ = readTernaryCard([['model', 'rk'], ['AB.L0', 12], ['AC.L0', 3], ['BC.L0', 9], ['energy', 'kJ/mol']]).model.at(300);
    const J = readTernaryCard([['model', 'rk'], ['AB.L0', 12000], ['AC.L0', 3000], ['BC.L0', 9000]]).model.at(300);
    // 12 * 1000 etc. are exact in binary floating point, so g agrees to rounding of the sums: 1e-12 relative
    expect(kJ.g(0.2, 0.3, 0.5)).toBeCloseTo(J.g(0.2, 0.3, 0.5), 9);
  });

  it('a card in two rows (keys, values) reads like one in two columns', () => {
    const rows = [RK.map((r) => r[0]), RK.map((r) => r[1])];
    expect(readTernaryCard(rows).model.key).toBe(readTernaryCard(RK).model.key);
  });

  it('CHECKCARD describes a ternary card in one line', () => {
    const line = checkCard([...RK, ['name A', 'water'], ['name B', 'solvent'], ['name C', 'solute']] as any);
    expect(line).not.toContain('\n');
    expect(line).toContain('ternary Redlich–Kister');
    expect(line).toContain('AB: L0 = 12000, L1 = 1500');
    expect(line).toContain('BC: L0 = 9000 - 2 T');
    expect(line).toContain('A = water, B = solvent, C = solute');
    expect(checkCard(NRTL as any)).toContain('ternary NRTL');
    expect(checkCard(FH as any)).toContain('NC = 200');
    // a binary card is still described as before
    expect(checkCard([['model', 'regular'], ['omega', 20000]] as any)).toContain('regular solution');
  });
});

describe('each edge of a ternary card is the binary card of that pair', () => {
  // ternary conventions (spec): the edge (i, j) with the third component absent is the binary
  // model with i as its A and x = x_j; the pair's keys without their prefix make its binary card.
  const edgeCard = (rows: Row[], pair: string, common: Row[] = []) => [
    ...rows.filter(([k]) => k === 'model' || k === 'energy'),
    ...rows.filter(([k]) => k.startsWith(`${pair}.`)).map(([k, v]) => [k.slice(3), v] as Row),
    ...common,
  ];
  const cases: Array<[string, Row[], (pair: string) => Row[]]> = [
    ['redlich-kister', RK, () => []],
    ['nrtl', NRTL, () => []],
    ['flory-huggins', FH, (pair) => [['NA', FH.find(([k]) => k === `N${pair[0]}`)![1]], ['NB', FH.find(([k]) => k === `N${pair[1]}`)![1]]]],
  ];
  for (const [name, rows, chains] of cases) {
    for (const pair of ['AB', 'AC', 'BC']) {
      it(`${name}, edge ${pair}: g on the edge equals the binary g`, () => {
        const tern = readTernaryCard(rows).model.at(350);
        const bin = readCard(edgeCard(rows, pair, chains(pair))).model.at(350);
        for (const x of [1e-9, 0.1, 0.37, 0.8, 1 - 1e-6]) {
          const p = { A: 0, B: 0, C: 0 };
          p[pair[0] as 'A'] = 1 - x;
          p[pair[1] as 'A'] = x;
          const gt = tern.g(p.A, p.B, p.C), gb = bin.g(x, 1 - x);
          // same formula with terms added in another order: a few ulp of the largest term
          expect(Math.abs(gt - gb)).toBeLessThanOrEqual(1e-12 * (Math.abs(gb) + tern.RT));
        }
      });
    }
  }
});
