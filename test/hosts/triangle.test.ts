/**
 * Composition-triangle pictures of three-component cards: the data come from the cell functions
 * through the engine (compared here with direct calls of the same functions: same code, same
 * doubles), the SVG puts every point where X = x_B + x_C / 2, Y = (sqrt(3)/2) x_C puts it and
 * names the card's components, the PNG draws its text, and `mixgap diagram` dispatches a ternary
 * card to it. Cards are invented.
 */
import { spawnSync } from 'child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'fs';
import os from 'os';
import path from 'path';
import { PNG } from 'pngjs';
import { describe, expect, test } from 'vitest';
import { CellFailure } from '../../src/functions/errors';
import * as x from '../../src/functions/extraction';
import * as t from '../../src/functions/ternary';
import type { CardGrid } from '../../src/hosts/diagram';
import { renderPng } from '../../src/hosts/diagram';
import { parseCascade, parseFeed, pixel, triangleData, triangleSvg, type Composition } from '../../src/hosts/triangle';
import { darkPixels } from './support/png';

const root = path.join(__dirname, '..', '..');
const metadata = JSON.parse(readFileSync(path.join(root, 'dist', 'functions.json'), 'utf8'));

// water (A) / an invented extractant (B) / an invented solute (C): a gap on the A–B edge
const card: CardGrid = [
  ['model', 'rk'], ['AB.L0', 12000], ['AC.L0', 2000], ['BC.L0', -1000],
  ['name A', 'water'], ['name B', 'solvex'], ['name C', 'quellic acid'],
];
// three equally immiscible liquids: a three-phase triangle
const symmetric: CardGrid = [['model', 'rk'], ['AB.L0', 12000], ['AC.L0', 12000], ['BC.L0', 12000]];
const T = 300;

describe('triangle data', () => {
  const data = triangleData(metadata, card, { T, rows: 31, feeds: [{ xB: 0.4, xC: 0.1, label: 'feed 1' }] });

  test('the binodal rows are TBINODAL\'s, the plait point TPLAIT\'s, the feed\'s phases TSPLIT\'s', () => {
    const rows = t.tBinodal(T, card as any, 31) as number[][];
    expect(data.branches).toHaveLength(1);
    expect(data.branches[0].map(([p, q]) => [...p, ...q])).toEqual(rows);
    expect(data.plaits).toEqual(t.tPlait(T, card as any));
    const split = (t.tSplit(0.4 as any, 0.1 as any, T, card as any) as unknown[][]).filter((r) => r[0] !== '').map((r) => r.slice(0, 3));
    expect(data.feeds[0].phases).toEqual(split);
    expect(data.names).toEqual(['water', 'solvex', 'quellic acid']);
    expect(data.triangles).toEqual([]);
  });

  test('three-phase triangles are TTRIANGLE\'s; #N/A rows of TBINODAL separate branches', () => {
    const sym = triangleData(metadata, symmetric, { T, rows: 20 });
    expect(sym.triangles).toEqual([t.tTriangle(T, symmetric as any)]);
    expect(sym.branches).toHaveLength(3);
    const rows = t.tBinodal(T, symmetric as any, 20) as unknown[][];
    expect(rows.filter((r) => r[0] instanceof CellFailure)).toHaveLength(2);
  });

  test('a card without a gap on any edge: no curve, and the reason', () => {
    const miscible: CardGrid = [['model', 'rk'], ['AB.L0', 2000], ['AC.L0', 2000], ['BC.L0', 2000]];
    const d = triangleData(metadata, miscible, { T });
    expect(d.branches).toEqual([]);
    expect(d.noCurve).toContain('no binary edge has a miscibility gap');
  });
});

describe('pictures', () => {
  const data = triangleData(metadata, card, { T, rows: 31, feeds: [parseFeed('feed 1=0.4,0.1')] });
  const svg = triangleSvg(data);

  test('plot coordinates: corners, and the plait point where X = x_B + x_C/2, Y = (sqrt 3 / 2) x_C puts it', () => {
    const [ax, ay] = pixel([1, 0, 0]), [bx, by] = pixel([0, 1, 0]), [cx, cy] = pixel([0, 0, 1]);
    // an equilateral triangle: three equal sides (to rounding)
    const side = (p: number[], q: number[]) => Math.hypot(p[0] - q[0], p[1] - q[1]);
    expect(Math.abs(side([ax, ay], [bx, by]) - side([bx, by], [cx, cy]))).toBeLessThan(1e-9);
    expect(Math.abs(side([ax, ay], [cx, cy]) - side([bx, by], [cx, cy]))).toBeLessThan(1e-9);
    const p = data.plaits[0] as Composition;
    const [px, py] = pixel(p);
    // the composition as the weights of the corners (barycentric coordinates)
    expect(Math.abs(px - (p[0] * ax + p[1] * bx + p[2] * cx))).toBeLessThan(1e-9);
    expect(Math.abs(py - (p[0] * ay + p[1] * by + p[2] * cy))).toBeLessThan(1e-9);
    expect(svg).toContain(`cx="${px.toFixed(1)}" cy="${py.toFixed(1)}"`);
  });

  test('the SVG names the components on corners and sides, and carries curve, tie-lines, plait point and feed', () => {
    for (const s of ['>water<', '>solvex<', '>quellic acid<', 'x_B, solvex', 'x_C, quellic acid', 'x_A, water', 'class="binodal"', 'class="tie-line"', 'class="plait"', 'class="feed"', 'feed 1 (0.4, 0.1)']) {
      expect(svg, s).toContain(s);
    }
    expect(svg.match(/class="binodal"/g)).toHaveLength(2);
  });

  test('the PNG draws it, text included', () => {
    expect(darkPixels(renderPng(svg, 1))).toBeGreaterThan(2000);
  });

  test('--feed texts', () => {
    expect(parseFeed('0.3,0.2')).toEqual({ xB: 0.3, xC: 0.2, label: '(0.3, 0.2)' });
    expect(() => parseFeed('0.3')).toThrow(/x_B,x_C/);
    expect(() => parseFeed('0.8,0.3')).toThrow(/not inside the composition triangle/);
  });

  test('mixgap diagram draws a ternary CSV card as a triangle (after npm run build)', () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'mixgap-triangle-'));
    const csv = path.join(dir, 'extraction.csv');
    writeFileSync(csv, `key,value\n${card.map((r) => r.join(',')).join('\n')}\n`);
    const run = (...args: string[]) => spawnSync(process.execPath, [path.join(root, 'bin', 'mixgap.js'), 'diagram', csv, ...args], { encoding: 'utf8' });
    const r = run('--at', String(T), '--feed', '0.4,0.1', '-o', path.join(dir, 'tri'));
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    expect(readFileSync(path.join(dir, 'tri.svg'), 'utf8')).toContain('x_C, quellic acid');
    expect(PNG.sync.read(readFileSync(path.join(dir, 'tri.png'))).width).toBeGreaterThan(600);
    expect(r.stdout).toContain('1 plait point');
    const noT = run('-o', path.join(dir, 'none'));
    expect(noT.status).toBe(1);
    expect(noT.stderr).toContain('--at');
  }, 60_000);
});

describe('a counter-current cascade on the triangle (--cascade)', () => {
  // water + solute fed, pure solvex as the solvent, 0.4 mol per mole of feed, three stages
  const spec = parseCascade('feed=0,0.1; solvent=1,0; ratio=0.4; stages=3; solute=quellic acid');
  const data = triangleData(metadata, card, { T, rows: 31, cascade: spec });
  const svg = triangleSvg(data);
  const stages = data.cascade!.stages;

  test('the stages are TSTAGETABLE\'s rows (through the engine, the same doubles as a direct call)', () => {
    const rows = x.tStageTable([[0, 0.1]] as any, [[1, 0]] as any, 0.4 as any, 3, 'quellic acid', T, card as any) as number[][];
    expect(stages.map((s) => [...s.raffinate, s.R, ...s.extract, s.E])).toEqual(rows);
    expect(data.cascade!.feed).toEqual([0.9, 0, 0.1]);
    expect(data.cascade!.solvent).toEqual([0, 1, 0]);
  });

  test('the dashed streams meet in one difference point: F - E_1 = R_k - E_(k+1) = R_N - S', () => {
    // from memory: Treybal, Mass-Transfer Operations (3rd ed., 1980), ch. 10, counter-current
    // multistage extraction: the net flow Delta = F - E_1 = R_k - E_(k+1) = R_N - S is the same
    // between every pair of stages (component by component)
    const flow = (p: Composition, n: number) => p.map((v) => v * n);
    const delta = (a: number[], b: number[]) => a.map((v, i) => v - b[i]);
    const ref = delta(flow(data.cascade!.feed, 1), flow(stages[0].extract, stages[0].E));
    const pairs = [...[0, 1].map((k) => delta(flow(stages[k].raffinate, stages[k].R), flow(stages[k + 1].extract, stages[k + 1].E))),
      delta(flow(stages[2].raffinate, stages[2].R), flow(data.cascade!.solvent, 0.4))];
    // the cascade's balances close to 1e-12 of the inflow (1.4 mol per mole of feed here)
    for (const d of pairs) d.forEach((v, i) => expect(Math.abs(v - ref[i])).toBeLessThan(1.4e-12));
  });

  test('the SVG holds each stage\'s raffinate and extract at their plot coordinates, numbered, with its tie-line', () => {
    stages.forEach((s, k) => {
      const [rx, ry] = pixel(s.raffinate), [ex, ey] = pixel(s.extract);
      expect(svg, `raffinate ${k + 1}`).toContain(`class="stage-raffinate" x="${(rx - 3.5).toFixed(1)}" y="${(ry - 3.5).toFixed(1)}"`);
      expect(svg, `extract ${k + 1}`).toContain(`class="stage-extract" cx="${ex.toFixed(1)}" cy="${ey.toFixed(1)}"`);
      expect(svg, `tie-line ${k + 1}`).toContain(`class="stage-tie" points="${rx.toFixed(1)},${ry.toFixed(1)} ${ex.toFixed(1)},${ey.toFixed(1)}"`);
      expect(svg.match(new RegExp(`>${k + 1}</text>`, 'g'))!.length, `labels of stage ${k + 1}`).toBeGreaterThanOrEqual(2);
    });
    expect(svg.match(/class="stage-passing"/g)).toHaveLength(4); // F-E1, R1-E2, R2-E3, R3-S
    expect(svg).toContain('raffinates 1–3');
    expect(svg).toContain('TSTAGETABLE');
  });

  test('--cascade texts', () => {
    expect(spec).toEqual({ feed: [0, 0.1], solvent: [1, 0], amounts: [0.4], stages: 3, solute: 'quellic acid' });
    expect(parseCascade('feed=0.15,0;solvent=0,1;amounts=100,60;stages=2;solute=B').amounts).toEqual([100, 60]);
    const bad: Array<[string, RegExp]> = [
      ['feed=0.15,0; solvent=0,1; stages=3; solute=B', /give either ratio= or amounts=/],
      ['feed=0.15,0; solvent=0,1; ratio=0.6; amounts=1,2; stages=3; solute=B', /not both or neither/],
      ['feed=0.15,0; solvent=0,1; ratio=0.6; stages=3', /"solute" is missing/],
      ['feed=0.15,0; solvent=0,1; ratio=0.6; stages=2.5; solute=B', /stages=2.5 must be a whole number from 1 to 100/],
      ['feed=0.8,0.3; solvent=0,1; ratio=0.6; stages=3; solute=B', /feed: x_B = 0.8, x_C = 0.3 is not in the composition triangle/],
      ['feed=0.15; solvent=0,1; ratio=0.6; stages=3; solute=B', /feed=0.15 must be 2 numbers/],
      ['feed=0.15,0; solvent=0,1; ratio=-1; stages=3; solute=B', /ratio must be positive/],
      ['feed=0.15,0; feed=0.1,0; solvent=0,1; ratio=0.6; stages=3; solute=B', /"feed" is given twice/],
      ['feed=0.15,0; solvent=0,1; ratio=0.6; stages=3; solute=B; colour=red', /unknown key "colour"/],
    ];
    for (const [text, message] of bad) expect(() => parseCascade(text), text).toThrow(message);
  });

  test('a cascade the cell function refuses is an error naming --cascade and the cell error', () => {
    // quellic acid is C: a feed without it has nothing to recover
    expect(() => triangleData(metadata, card, { T, rows: 11, cascade: parseCascade('feed=0.1,0; solvent=1,0; ratio=0.4; stages=2; solute=C') }))
      .toThrow(/--cascade \(TSTAGETABLE\): #NUM! .*holds no C/);
  });

  test('mixgap diagram --cascade draws it (after npm run build)', () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'mixgap-cascade-'));
    const csv = path.join(dir, 'extraction.csv');
    writeFileSync(csv, `key,value\n${card.map((r) => r.join(',')).join('\n')}\n`);
    const r = spawnSync(process.execPath, [path.join(root, 'bin', 'mixgap.js'), 'diagram', csv, '--at', String(T),
      '--cascade', 'feed=0,0.1; solvent=1,0; ratio=0.4; stages=3; solute=C', '-o', path.join(dir, 'tri')], { encoding: 'utf8' });
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    expect(r.stdout).toContain('a counter-current cascade of 3 stages');
    expect(readFileSync(path.join(dir, 'tri.svg'), 'utf8').match(/class="stage-extract"/g)).toHaveLength(3);
    const wrong = spawnSync(process.execPath, [path.join(root, 'bin', 'mixgap.js'), 'diagram', csv, '--at', String(T), '--cascade', 'feed=0,0.1', '-o', path.join(dir, 'bad')], { encoding: 'utf8' });
    expect(wrong.status).toBe(1);
    expect(wrong.stderr).toContain('--cascade feed=0,0.1: "solvent" is missing');
  }, 60_000);
});
