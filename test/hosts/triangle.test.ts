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
import * as t from '../../src/functions/ternary';
import type { CardGrid } from '../../src/hosts/diagram';
import { renderPng } from '../../src/hosts/diagram';
import { parseFeed, pixel, triangleData, triangleSvg, type Composition } from '../../src/hosts/triangle';

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

function darkPixels(png: Buffer): number {
  const img = PNG.sync.read(png);
  let n = 0;
  for (let i = 0; i < img.data.length; i += 4) {
    if (img.data[i + 3] > 0 && (img.data[i] + img.data[i + 1] + img.data[i + 2]) / 3 < 128) n++;
  }
  return n;
}

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
