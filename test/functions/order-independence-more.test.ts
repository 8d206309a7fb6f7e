/**
 * The same formula gives the same number whatever was computed before, for the functions that the
 * fixed set (order-independence.test.ts) does not cover: the three-component functions (splits,
 * plait points, three-phase triangles, binodal tables, cascades), the fit and the uncertainty functions.
 * The same formulas, with warm-up formulas at nearby temperatures and feeds between them, are
 * evaluated through the embedded engine in several orders (as listed, reversed, seeded shuffles)
 * and in a child process (`mixgap eval --json`, a fresh process); every result must be the same
 * double, bit for bit, in all of them. The cards are the README's invented examples.
 */
import { spawnSync } from 'child_process';
import { existsSync } from 'fs';
import path from 'path';
import { describe, expect, it } from 'vitest';
import { forgetSolves } from '../../src/core/equilibrium';
import type { FormulaResult } from '../../src/hosts/evaluate';
import { evaluateIn, generatedMetadata } from './support/evaluate';
import { generator, shuffled } from './support/random';

const RK = '{"model","rk";"AB.L0",13.5;"AB.L0.b",-0.005;"AB.L1",1.2;"AC.L0",2;"BC.L0",-1;"ABC.M",3;"energy","kJ/mol";"temperature","°C";"name A","water";"name B","tarnol";"name C","quellic acid"}';
const NRTL = '{"model","nrtl";"AB.a12",-0.5;"AB.b12",1100;"AB.a21",0.6;"AB.b21",450;"AB.alpha",0.25;"AC.b12",-150;"AC.b21",250;"AC.alpha",0.3;"BC.b12",-200;"BC.b21",100;"BC.alpha",0.3}';
const FH = '{"model","fh";"NA",1;"NB",1;"NC",200;"AB.chi.A",0.4;"AC.chi.A",0.9;"AC.chi.B",150;"BC.chi.A",0.35}';
const SYMMETRIC = '{"model","rk";"AB.L0",12000;"AC.L0",12000;"BC.L0",12000}';
const EXTRACTION = '{"model","rk";"AB.L0",3.2;"AC.L0",8.8;"BC.L0",0.6;"energy","kJ/mol";"temperature","°C";"name A","Corvane";"name B","lumic acid";"name C","Tessol"}';
const REGULAR_U = '{"model","regular";"omega",20000;"u(omega)",200}';
// the README's worked example of a fit: an invented blend's cloud points (°C)
const BLEND_START = '{"model","flory-huggins","";"NA",100,"";"NB",60,"fixed";"chi.A","","fit";"chi.B","","fit";"temperature","°C",""}';
const CLOUDS = [[79, 0.15], [118.4, 0.25], [143.1, 0.35], [156.1, 0.45], [161.9, 0.55], [158.9, 0.65], [145.3, 0.75]];
const cloudData = (rows: number[][]) => `{"kind","T","phi","","u";${rows.map(([T, phi]) => `"cloud point",${T},${phi},"",0.5`).join(';')}}`;
const RK_U = '{"model","rk";"energy","kJ/mol";"temperature","°C";"L0",20;"L1",2;"u(L0)",0.15;"u(L1)",0.12;"r(L0, L1)",-0.6}';

/** The formulas compared, and for each the warm-up formulas (nearby T or feed) put before it in the mixed orders. */
const CASES: Array<{ formula: string; warm: string[] }> = [
  ...[[0.4, 0.1], [0.3, 0.15], [0.5, 0.05]].map(([b, c]) => ({
    formula: `=MIXGAP.TSPLIT(${b}, ${c}, 25, ${RK})`,
    warm: [`=MIXGAP.TSPLIT(${b + 0.01}, ${c}, 25, ${RK})`, `=MIXGAP.TSPLIT(${b}, ${c}, 27, ${RK})`],
  })),
  { formula: `=MIXGAP.TPHASES(0.4, 0.1, 25, ${RK})`, warm: [`=MIXGAP.TPHASES(0.41, 0.1, 24, ${RK})`] },
  { formula: `=MIXGAP.TDIST("quellic acid", 0.4, 0.1, 25, ${RK})`, warm: [`=MIXGAP.TSPLIT(0.42, 0.09, 25, ${RK})`] },
  { formula: `=MIXGAP.TPLAIT(25, ${RK})`, warm: [`=MIXGAP.TPLAIT(26, ${RK})`, `=MIXGAP.TBINODAL(24, ${RK}, 5)`] },
  { formula: `=MIXGAP.TBINODAL(25, ${RK}, 12)`, warm: [`=MIXGAP.TBINODAL(26, ${RK}, 7)`] },
  { formula: `=MIXGAP.TSPLIT(0.35, 0.08, 313.15, ${NRTL})`, warm: [`=MIXGAP.TSPLIT(0.36, 0.08, 312, ${NRTL})`] },
  { formula: `=MIXGAP.TPLAIT(313.15, ${NRTL})`, warm: [`=MIXGAP.TPLAIT(315, ${NRTL})`] },
  { formula: `=MIXGAP.TSPLIT(0.3, 0.1, 298.15, ${FH})`, warm: [`=MIXGAP.TSPLIT(0.31, 0.1, 299, ${FH})`] },
  { formula: `=MIXGAP.TPLAIT(298.15, ${FH})`, warm: [`=MIXGAP.TPLAIT(300, ${FH})`] },
  { formula: `=MIXGAP.TTRIANGLE(300, ${SYMMETRIC})`, warm: [`=MIXGAP.TTRIANGLE(305, ${SYMMETRIC})`, `=MIXGAP.TSPLIT(0.3, 0.3, 300, ${SYMMETRIC})`] },
  { formula: `=MIXGAP.TSPLIT(0.09375, 0.375, 30, ${EXTRACTION})`, warm: [`=MIXGAP.TSPLIT(0.1, 0.37, 30, ${EXTRACTION})`] },
  { formula: `=MIXGAP.TCASCADE({0.85,0.15,0}, {0,0,1}, {100,60}, 3, "lumic acid", 30, ${EXTRACTION})`, warm: [`=MIXGAP.TCASCADE({0.85,0.15,0}, {0,0,1}, {100,60}, 4, "lumic acid", 30, ${EXTRACTION})`] },
  { formula: `=MIXGAP.TRECOVERY({0.85,0.15,0}, {0,0,1}, 0.6, 1, "lumic acid", 30, ${EXTRACTION})`, warm: [`=MIXGAP.TRECOVERY({0.85,0.15,0}, {0,0,1}, 0.65, 1, "lumic acid", 31, ${EXTRACTION})`] },
  { formula: `=MIXGAP.TSTAGETABLE({0.85,0.15,0}, {0,0,1}, {100,60}, 3, "lumic acid", 30, ${EXTRACTION})`, warm: [`=MIXGAP.TRECOVERY({0.85,0.15,0}, {0,0,1}, {100,55}, 3, "lumic acid", 30, ${EXTRACTION})`] },
  { formula: `=MIXGAP.UNCERTAINTY("TCRIT", ${REGULAR_U})`, warm: [`=MIXGAP.UNCERTAINTY("GAPLOW", 905, ${REGULAR_U})`] },
  { formula: `=MIXGAP.UNCERTAINTY("GAPLOW", 900, ${REGULAR_U})`, warm: [`=MIXGAP.GAPLOW(899, ${REGULAR_U})`, `=MIXGAP.UNCERTAINTY("GAPHIGH", 901, ${REGULAR_U})`] },
  { formula: `=MIXGAP.UNCERTAINTY("GAPLOW", 500, ${RK_U})`, warm: [`=MIXGAP.UNCERTAINTY("GAPLOW", 510, ${RK_U})`, `=MIXGAP.GAPTABLE(450, 550, 5, ${RK_U})`] },
  { formula: `=MIXGAP.UNCERTAINTY("TCRIT", ${RK_U})`, warm: [`=MIXGAP.UNCERTAINTY("XCRIT", ${RK_U})`] },
  { formula: `=MIXGAP.GAPBAND(400, 900, 6, ${RK_U})`, warm: [`=MIXGAP.GAPBAND(420, 880, 4, ${RK_U})`] },
  { formula: `=MIXGAP.FITMODEL(${BLEND_START}, ${cloudData(CLOUDS)})`, warm: [`=MIXGAP.FITMODEL(${BLEND_START}, ${cloudData(CLOUDS.slice(1))})`] },
  { formula: `=MIXGAP.TCRIT(MIXGAP.FITMODEL(${BLEND_START}, ${cloudData(CLOUDS)}, , FALSE))`, warm: [`=MIXGAP.GAPLOW(150, MIXGAP.FITMODEL(${BLEND_START}, ${cloudData(CLOUDS.slice(0, 6))}, , FALSE))`] },
  { formula: `=MIXGAP.UNCERTAINTY("TCRIT", MIXGAP.FITMODEL(${BLEND_START}, ${cloudData(CLOUDS)}))`, warm: [`=MIXGAP.UNCERTAINTY("GAPLOW", 150, MIXGAP.FITMODEL(${BLEND_START}, ${cloudData(CLOUDS)}))`] },
];

/** A result with every number as the hex of its float64 bits (errors by code only). */
type Shown = string | Shown[];
const bitsOf = new DataView(new ArrayBuffer(8));
function shown(v: unknown): Shown {
  if (Array.isArray(v)) return v.map(shown);
  if (typeof v === 'number') {
    bitsOf.setFloat64(0, v);
    return bitsOf.getBigUint64(0).toString(16);
  }
  if (v && typeof v === 'object' && 'error' in v) return `error:${(v as { error: string }).error}`;
  return `text:${String(v)}`;
}

/** The cases' results, evaluated in `order` (indices into CASES), with their warm-ups first where `warm`. */
async function resultsIn(order: number[], warm: boolean): Promise<Map<number, Shown>> {
  const formulas: string[] = [], which: number[] = [];
  for (const i of order) {
    if (warm) for (const w of CASES[i].warm) { formulas.push(w); which.push(-1); }
    formulas.push(CASES[i].formula); which.push(i);
  }
  const got = evaluateIn(await generatedMetadata(), formulas) as FormulaResult[];
  const out = new Map<number, Shown>();
  which.forEach((i, k) => { if (i >= 0) out.set(i, shown(got[k])); });
  return out;
}

describe('three-component, fit and uncertainty results do not depend on what was computed before', () => {
  const listed = CASES.map((_, i) => i);

  it('every case gives a result (numbers, not errors: the comparison is of answers)', async () => {
    forgetSolves();
    const first = await resultsIn(listed, false);
    const errors = listed.filter((i) => JSON.stringify(first.get(i)).includes('error:')).map((i) => CASES[i].formula);
    expect(errors).toEqual([]);
  });

  it('as listed, reversed and in seeded shuffles with warm-ups, in one process: the same bits', async () => {
    forgetSolves();
    const want = await resultsIn(listed, false);
    const orders: Array<[string, number[], boolean]> = [
      ['reversed, with warm-ups', listed.slice().reverse(), true],
      ...[8101, 8102].map((seed): [string, number[], boolean] => [`shuffled (seed ${seed}), with warm-ups`, shuffled(listed, generator(seed)), true]),
    ];
    const differ: string[] = [];
    for (const [name, order, warm] of orders) {
      const got = await resultsIn(order, warm);
      for (const i of listed) {
        if (JSON.stringify(got.get(i)) !== JSON.stringify(want.get(i))) differ.push(`${name}: ${CASES[i].formula}`);
      }
    }
    expect(differ).toEqual([]);
  });

  it('a fresh child process (mixgap eval --json), another shuffled order (seed 8103): the same bits', async () => {
    forgetSolves();
    const want = await resultsIn(listed, false);
    const root = path.join(__dirname, '..', '..');
    expect(existsSync(path.join(root, 'dist', 'node', 'cli.js')), 'run `npm run build`').toBe(true);
    const order = shuffled(listed, generator(8103));
    const p = spawnSync(process.execPath, [path.join(root, 'bin', 'mixgap.js'), 'eval', '--json', ...order.map((i) => CASES[i].formula)],
      { encoding: 'utf8', cwd: root, maxBuffer: 64 << 20 });
    expect(p.status, p.stderr).toBe(0);
    // JSON numbers are the shortest text that reads back as the same double: no rounding here
    const got = JSON.parse(p.stdout) as unknown[];
    const differ = order.filter((i, k) => JSON.stringify(shown(got[k])) !== JSON.stringify(want.get(i))).map((i) => CASES[i].formula);
    expect(differ).toEqual([]);
  });
});
