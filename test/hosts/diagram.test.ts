/**
 * Phase-diagram pictures: the data come from the cell functions through the engine (compared here
 * with direct calls of the same functions, exactly: same code, same doubles), the SVG has the
 * labels a reader needs, and the PNG draws text with the packaged fonts on any machine.
 */
import { spawnSync } from 'child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'fs';
import os from 'os';
import path from 'path';
import { PNG } from 'pngjs';
import { describe, expect, test } from 'vitest';
import * as fns from '../../src/functions/index';
import { system } from '../../src/functions/args';
import { diagramData, diagramLabels, diagramSpec, renderPng, renderSvg } from '../../src/hosts/diagram';
import type { CardGrid } from '../../src/hosts/diagram';

const root = path.join(__dirname, '..', '..');
const metadata = JSON.parse(readFileSync(path.join(root, 'dist', 'functions.json'), 'utf8'));

const card: CardGrid = [
  ['model', 'redlich-kister'], ['L0', 18], ['L1', 2.2], ['energy', 'kJ/mol'], ['temperature', '°C'],
  ['name A', 'Avarite'], ['name B', 'Bexium'],
];

/** Pixels darker than mid-grey in a PNG. */
function darkPixels(png: Buffer): number {
  const img = PNG.sync.read(png);
  let n = 0;
  for (let i = 0; i < img.data.length; i += 4) {
    if (img.data[i + 3] > 0 && (img.data[i] + img.data[i + 1] + img.data[i + 2]) / 3 < 128) n++;
  }
  return n;
}

describe('diagram data', () => {
  const data = diagramData(metadata, card, { tmin: 300, tmax: 900, rows: 61, marks: [{ x: 0.12, label: 'grade L' }] });

  test('the binodal and spinodal are the rows of GAPTABLE over the range', () => {
    const table = fns.gapTable(300, 900, 61, card) as unknown[][];
    const has = (curve: string, x: unknown, T: unknown) =>
      data.points.some((p) => p.curve === curve && p.x === x && p.T === T);
    let rows = 0;
    for (const [T, low, high, spinLow, spinHigh] of table) {
      if (typeof low !== 'number') continue;
      rows++;
      expect(has('binodal', low, T) && has('binodal', high, T), `binodal at ${T}`).toBe(true);
      expect(has('spinodal', spinLow, T) && has('spinodal', spinHigh, T), `spinodal at ${T}`).toBe(true);
    }
    expect(rows).toBeGreaterThan(30);
  });

  test('the critical point is TCRIT, XCRIT, and both binodal branches end there (the dome closes)', () => {
    expect(data.critical).toEqual([{ T: fns.tCrit(card), x: fns.xCrit(card), kind: 'upper' }]);
    const c = data.critical[0];
    for (const side of ['binodal low', 'binodal high']) {
      const branch = data.points.filter((p) => p.branch.endsWith(side));
      const top = branch.reduce((a, b) => (b.T > a.T ? b : a));
      expect(top, side).toMatchObject({ T: c.T, x: c.x });
    }
  });

  test('the axes name the quantities and units the card uses', () => {
    expect(data.temperatureUnit).toBe('°C');
    expect(data.compositionLabel).toBe('Mole fraction of Bexium');
    expect(data.title).toBe('Miscibility gap, Avarite–Bexium');
  });

  test('the labels come from the card as read, not from the wording of its CHECKCARD line', () => {
    // A description that says the opposite of the card in every respect the old sentence-matching
    // looked for (unit, names, volume fraction) leaves the labels as the structured fields say.
    const sys = system(card);
    const misleading = { ...sys, description: 'NRTL; composition = volume fraction of Q; temperatures in K; A = P, B = Q; upper critical point' };
    expect(diagramLabels(misleading)).toEqual(diagramLabels(sys));
    expect(diagramLabels(misleading)).toEqual({ temperatureUnit: '°C', compositionLabel: 'Mole fraction of Bexium', compositionLabelA: 'Mole fraction of Avarite', title: 'Miscibility gap, Avarite–Bexium' });
    // and the structured fields do move them: a Flory–Huggins card is drawn in volume fractions
    const fh = diagramLabels(system([['model', 'fh'], ['NA', 1], ['NB', 50], ['chi.B', 400], ['name B', 'resin']]));
    expect(fh).toEqual({ temperatureUnit: 'K', compositionLabel: 'Volume fraction of resin', compositionLabelA: 'Volume fraction of A', title: 'Miscibility gap, A–resin' });
  });

  test('another temperature unit redraws the card in it', () => {
    const inK = diagramData(metadata, card, { temperatureUnit: 'K' });
    const cardK = [...card.filter((r) => r[0] !== 'temperature'), ['temperature', 'K']];
    expect(inK.temperatureUnit).toBe('K');
    expect(inK.critical[0].T).toBe(fns.tCrit(cardK));
    expect(inK.tmin).toBeLessThan(inK.critical[0].T);
    expect(inK.tmax).toBeGreaterThan(inK.critical[0].T);
  });

  test('a card without a critical point needs a temperature range', () => {
    // omega = -5000 J/mol: attracting components, no gap at any temperature.
    expect(() => diagramData(metadata, [['model', 'regular'], ['omega', -5000]])).toThrow(/--tmin and --tmax/);
  });
});

describe('pictures', () => {
  test('the SVG carries the axis titles, the critical point and the marks', async () => {
    const data = diagramData(metadata, card, { marks: [{ x: 0.12, label: 'grade L, x0 = 0.12' }] });
    const svg = await renderSvg(diagramSpec(data));
    expect(svg.startsWith('<svg')).toBe(true);
    for (const text of ['Temperature (°C)', 'Mole fraction of Bexium', 'upper critical point', 'grade L, x0 = 0.12', 'binodal', 'spinodal']) {
      expect(svg, text).toContain(text);
    }
  }, 30_000);

  test('the PNG draws text with the packaged fonts (no system fonts)', () => {
    const text = '<svg xmlns="http://www.w3.org/2000/svg" width="200" height="50"><text x="10" y="35" font-size="28">Tc 850</text></svg>';
    const empty = '<svg xmlns="http://www.w3.org/2000/svg" width="200" height="50"></svg>';
    expect(darkPixels(renderPng(empty, 1))).toBe(0);
    // A 28 px label covers a few hundred pixels; without a font resvg draws nothing at all.
    expect(darkPixels(renderPng(text, 1))).toBeGreaterThan(200);
  });

  test('mixgap diagram writes OUT.svg and OUT.png for a CSV card', () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'mixgap-diagram-'));
    const csv = path.join(dir, 'card.csv');
    writeFileSync(csv, 'key,value\nmodel,regular\nomega,21\nenergy,kJ/mol\n# a comment line\ntemperature,°C\n');
    const r = spawnSync(process.execPath, [path.join(root, 'bin', 'mixgap.js'), 'diagram', csv, '--mark', '0.3', '-o', path.join(dir, 'pic.png')], { encoding: 'utf8' });
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    expect(readFileSync(path.join(dir, 'pic.svg'), 'utf8')).toContain('x0 = 0.3');
    const png = PNG.sync.read(readFileSync(path.join(dir, 'pic.png')));
    expect(png.width).toBeGreaterThan(600);
    expect(r.stdout).toContain(`${path.join(dir, 'pic')}.png`);
  }, 30_000);
});
