/**
 * Phase-diagram pictures: the data come from the cell functions through the engine (compared here
 * with direct calls of the same functions, exactly: same code, same doubles), the SVG has the
 * labels a reader needs, and the PNG draws text with the packaged fonts on any machine.
 */
import { spawnSync } from 'child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'fs';
import os from 'os';
import path from 'path';
import { Resvg } from '@resvg/resvg-js';
import { DOMParser, XMLSerializer } from '@xmldom/xmldom';
import type { Element as XmlElement, Node as XmlNode } from '@xmldom/xmldom';
import { PNG } from 'pngjs';
import { describe, expect, test } from 'vitest';
import * as fns from '../../src/functions/index';
import { system } from '../../src/functions/args';
import { across, diagramData, diagramLabels, diagramSpec, fontFiles, linearDomain, logDomain, logTicks, PLOT, renderPng, renderSvg } from '../../src/hosts/diagram';
import type { CompositionAxis, DiagramData } from '../../src/hosts/diagram';
import type { CardGrid } from '../../src/hosts/diagram';
import { darkPixels } from './support/png';

const root = path.join(__dirname, '..', '..');
const metadata = JSON.parse(readFileSync(path.join(root, 'dist', 'functions.json'), 'utf8'));

const card: CardGrid = [
  ['model', 'redlich-kister'], ['L0', 18], ['L1', 2.2], ['energy', 'kJ/mol'], ['temperature', '°C'],
  ['name A', 'Avarite'], ['name B', 'Bexium'],
];

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

  test('mixgap diagram --log and --full-range reach the picture', () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'mixgap-diagram-'));
    const csv = path.join(dir, 'polymer.csv');
    writeFileSync(csv, `key,value\n${polymer.map((r) => r.join(',')).join('\n')}\n`);
    const run = (...args: string[]) => spawnSync(process.execPath, [path.join(root, 'bin', 'mixgap.js'), 'diagram', csv, '--tmin', '350', '--tmax', '380', '--rows', '21', ...args], { encoding: 'utf8' });
    const log = run('--log', 'B', '-o', path.join(dir, 'log'));
    expect(log.stderr).toBe('');
    const svg = readFileSync(path.join(dir, 'log.svg'), 'utf8');
    expect(svg).toContain('Volume fraction of polymer (log scale)');
    expect(svg).toContain('>1e-4</text>');
    const both = run('--log', 'B', '--full-range', '-o', path.join(dir, 'both'));
    expect(both.status).toBe(1);
    expect(both.stderr).toMatch(/--full-range.*--log/);
  }, 30_000);
});

// An invented polymer solution: a solvent (NA = 1) and a polymer of 1000 segments (NB = 1000),
// chi = 200 K / T. Flory (1953), Principles of Polymer Chemistry, ch. XIII: phi_c = 1 / (1 + sqrt(NB)),
// chi_c = (1 + 1/sqrt(NB))^2 / 2, so Tc = 200 K / chi_c = 375.85 K. Between 350 and 380 K its
// polymer-poor branch runs from phi_c = 0.031 down to about 1e-4.
const polymer: CardGrid = [['model', 'flory-huggins'], ['NA', 1], ['NB', 1000], ['chi.A', 0], ['chi.B', 200], ['name A', 'solvent'], ['name B', 'polymer']];
// The same solution written the other way round (the polymer is A): swapping NA with NB and phi
// with 1 - phi leaves the Flory–Huggins g unchanged (its definition, Flory 1953 ch. XII), so its
// polymer-poor branch lies near x = 1, at 1 - (the first card's branch).
const polymerAsA: CardGrid = [['model', 'flory-huggins'], ['NA', 1000], ['NB', 1], ['chi.A', 0], ['chi.B', 200], ['name A', 'polymer'], ['name B', 'solvent']];
const phiC = 1 / (1 + Math.sqrt(1000));

const inDomain = (axis: CompositionAxis, x: number) => {
  const v = axis.component === 'A' ? 1 - x : x;
  return v >= axis.domain[0] && v <= axis.domain[1];
};
/** Pixels from the plot's left edge at which a composition x is drawn. */
const pixel = (axis: CompositionAxis, x: number) => across(axis, axis.component === 'A' ? 1 - x : x) * PLOT.width;
const binodal = (d: DiagramData) => d.points.filter((p) => p.curve === 'binodal').map((p) => p.x);

describe('composition axis', () => {
  test('a polymer solution: the automatic range holds the whole dome, the log axis spreads out its dilute branch', () => {
    const lin = diagramData(metadata, polymer, { tmin: 350, tmax: 380, rows: 61 });
    const log = diagramData(metadata, polymer, { tmin: 350, tmax: 380, rows: 61, log: 'B' });
    // The card is the one described: Flory's critical composition (the solver's own tolerance is far
    // below 1e-6; 1e-6 is 0.004 px on the widest axis here).
    expect(Math.abs(lin.critical[0].x - phiC)).toBeLessThan(1e-6);
    const dilute = Math.min(...binodal(lin));
    expect(dilute).toBeGreaterThan(1e-5);
    expect(dilute).toBeLessThan(1e-3);

    // Linear, automatic: every point inside, and the dome (up to phi = 0.14) fills the axis instead of
    // a seventh of 0 to 1.
    expect(lin.axis).toMatchObject({ scale: 'linear', component: 'B', title: 'Volume fraction of polymer' });
    const all = [...lin.points.map((p) => p.x), ...lin.critical.map((c) => c.x)];
    for (const x of all) expect(inDomain(lin.axis, x), `x = ${x}`).toBe(true);
    const [lo, hi] = lin.axis.domain;
    expect((Math.max(...binodal(lin)) - Math.min(...binodal(lin))) / (hi - lo)).toBeGreaterThan(0.75);
    // ... but there the dilute end is drawn within a pixel of the axis: what the log axis is for.
    expect(pixel(lin.axis, dilute)).toBeLessThan(1);

    // Log of x: every binodal point inside the domain, and the branch from the critical point to its
    // dilute end crosses a third of the plot or more (2.5 of about 4.3 decades).
    expect(log.axis).toMatchObject({ scale: 'log', component: 'B', title: 'Volume fraction of polymer (log scale)' });
    for (const x of binodal(log)) expect(inDomain(log.axis, x), `x = ${x}`).toBe(true);
    expect(log.axis.domain[0]).toBeLessThanOrEqual(dilute);
    expect(pixel(log.axis, dilute)).toBeGreaterThan(10);
    expect(pixel(log.axis, log.critical[0].x) - pixel(log.axis, dilute)).toBeGreaterThan(PLOT.width / 3);
  });

  test('a dome ending near x = 0.5 is drawn on 0 to about 0.55, not squeezed into half of 0 to 1', () => {
    // The polymer card down to 260 K: its polymer-rich branch reaches phi = 0.49.
    const d = diagramData(metadata, polymer, { tmin: 260, tmax: 400, rows: 61 });
    const xs = binodal(d);
    expect(Math.max(...xs)).toBeGreaterThan(0.45);
    expect(Math.max(...xs)).toBeLessThan(0.52);
    expect(d.axis.domain[0]).toBe(0);
    expect(d.axis.domain[1]).toBeLessThanOrEqual(0.6);
    for (const x of xs) expect(inDomain(d.axis, x)).toBe(true);
    expect(pixel(d.axis, Math.max(...xs))).toBeGreaterThan(0.8 * PLOT.width);
  });

  test('--full-range draws 0 to 1, and cannot be combined with a log axis', async () => {
    const d = diagramData(metadata, polymer, { tmin: 350, tmax: 380, rows: 31, fullRange: true });
    expect(d.axis).toMatchObject({ scale: 'linear', domain: [0, 1] });
    const spec = diagramSpec(d) as { layer: Array<{ encoding: { x: { scale: { domain: number[] } } } }> };
    expect(spec.layer[0].encoding.x.scale.domain).toEqual([0, 1]);
    expect(() => diagramData(metadata, polymer, { tmin: 350, tmax: 380, rows: 31, fullRange: true, log: 'B' })).toThrow(/cannot show x = 0/);
    expect(() => diagramData(metadata, polymer, { tmin: 350, tmax: 380, rows: 31, log: 'C' })).toThrow(/--log C: .*B .*A .*polymer, solvent/);
  });

  test('a dilute branch near x = 1 is drawn as 1 - x on a reversed log axis: the mirror image of the same solution written the other way round', () => {
    const b = diagramData(metadata, polymer, { tmin: 350, tmax: 380, rows: 61, log: 'B' });
    const a = diagramData(metadata, polymerAsA, { tmin: 350, tmax: 380, rows: 61, log: 'polymer' }); // A, by its name
    expect(a.axis).toMatchObject({ scale: 'log', component: 'A', title: 'Volume fraction of polymer (log scale, falling to the right)' });
    expect(a.axis.domain).toEqual(b.axis.domain);
    for (const x of binodal(a)) expect(inDomain(a.axis, x), `x = ${x}`).toBe(true);
    // Same dilute branch, mirrored: its end and the critical point sit at W - (the other picture's
    // pixel). 0.5 px: the two cards' binodals agree to solver precision, far below a pixel.
    const diluteB = Math.min(...binodal(b));
    const diluteA = Math.max(...binodal(a));
    expect(Math.abs(pixel(a.axis, diluteA) - (PLOT.width - pixel(b.axis, diluteB)))).toBeLessThan(0.5);
    expect(Math.abs(pixel(a.axis, a.critical[0].x) - (PLOT.width - pixel(b.axis, b.critical[0].x)))).toBeLessThan(0.5);
    // A-rich (polymer-rich) on the left, as on the linear axis.
    const spec = diagramSpec(a) as { layer: Array<{ encoding: { x: { scale: { reverse?: boolean } } } }> };
    expect(spec.layer[0].encoding.x.scale.reverse).toBe(true);
    expect(pixel(a.axis, a.critical[0].x)).toBeLessThan(pixel(a.axis, diluteA));
  });

  test('range rules: margins, whole ticks, at most ten decades', () => {
    // common practice, no published source: a margin around the data, ends on whole 1-2-5 ticks.
    expect(linearDomain([0.21, 0.78])).toEqual([0.1, 0.9]);
    expect(linearDomain([0.004, 0.97])).toEqual([0, 1]);
    expect(linearDomain([0.5])).toEqual([0.495, 0.505]);
    expect(linearDomain([])).toEqual([0, 1]);
    expect(logDomain([1e-4, 0.03, 0.14])).toEqual([1e-5, 0.2]);
    expect(logDomain([3e-4, 0.5])).toEqual([1e-4, 1]);
    expect(logDomain([1e-130, 0.7])).toEqual([1e-10, 1]);
    expect(() => logDomain([0])).toThrow(/linear axis/);
    expect(logTicks([1e-5, 0.2])).toEqual([1e-5, 1e-4, 1e-3, 1e-2, 0.1, 0.2]);
    expect(logTicks([0.01, 1])).toEqual([0.01, 0.02, 0.05, 0.1, 0.2, 0.5, 1]);
  });
});

/** A text of the SVG: its words, the role vega gave its group, and its box as drawn with the packaged fonts. */
interface TextBox { text: string; role: string; x: number; y: number; width: number; height: number }

/**
 * The box of every text element of a vega SVG, each measured by resvg (with the fonts the PNG uses)
 * in a picture holding that text alone under the same transforms; the picture's size; the plot
 * rectangle (the frame's background path); the centres of the point symbols.
 */
function layout(svg: string) {
  const doc = new DOMParser().parseFromString(svg, 'image/svg+xml');
  const root = doc.documentElement!;
  const size = { width: Number(root.getAttribute('width')), height: Number(root.getAttribute('height')) };
  const font = { fontFiles: fontFiles(), loadSystemFonts: false, defaultFontFamily: 'DejaVu Sans', sansSerifFamily: 'DejaVu Sans' };
  const texts: TextBox[] = [];
  const symbols: Array<{ x: number; y: number }> = [];
  let plot: { x: number; y: number; width: number; height: number } | undefined;
  const offset = (transforms: string[]) => transforms.reduce((o, t) => {
    for (const m of t.matchAll(/translate\(([-\d.e]+),\s*([-\d.e]+)\)/g)) { o.x += Number(m[1]); o.y += Number(m[2]); }
    return o;
  }, { x: 0, y: 0 });
  const visit = (node: XmlNode, transforms: string[], role: string) => {
    if (node.nodeType !== 1) return;
    const el = node as XmlElement;
    const cls = el.getAttribute('class') ?? '';
    const here = cls.includes('role-') ? cls : role;
    const t = el.getAttribute('transform');
    if (el.tagName === 'text') {
      const wrapped = transforms.reduce((inner, tr) => `<g transform="${tr}">${inner}</g>`, new XMLSerializer().serializeToString(el));
      const bbox = new Resvg(`<svg xmlns="http://www.w3.org/2000/svg" width="${size.width}" height="${size.height}">${wrapped}</svg>`, { font }).getBBox();
      if (bbox) texts.push({ text: el.textContent ?? '', role: here, x: bbox.x, y: bbox.y, width: bbox.width, height: bbox.height });
      return;
    }
    if (el.tagName === 'path' && cls === 'background' && /^M0\.5,0\.5h/.test(el.getAttribute('d') ?? '') && !plot) {
      const [w, h] = /^M0\.5,0\.5h([\d.]+)v([\d.]+)/.exec(el.getAttribute('d')!)!.slice(1).map(Number);
      const o = offset(transforms);
      plot = { x: o.x, y: o.y, width: w, height: h }; // the path is drawn half a pixel in, for a crisp line
    }
    if (el.tagName === 'path' && here.includes('mark-symbol role-mark')) {
      const o = offset([...transforms, t ?? '']);
      symbols.push(o);
    }
    // Transforms listed innermost first: the text is wrapped from the inside out.
    const next = t ? [t, ...transforms] : transforms;
    for (let c = el.firstChild; c; c = c.nextSibling) visit(c, next, here);
  };
  visit(root, [], '');
  return { size, plot: plot!, texts, symbols };
}

describe('labels stay inside the picture', () => {
  const lowerCritical: CardGrid = [['model', 'redlich-kister'], ['L0', -10000], ['L0.b', 30], ['name A', 'Avarite'], ['name B', 'Bexium']];
  // Pictures that push labels to the edges: a critical point near the left edge (automatic range and
  // 0 to 1), a mark at x = 0.01 on 0 to 1, the top of the range just above a critical point, a
  // reversed log axis, a lower critical point, a mark near the right edge and a long mark label.
  const cases: Array<[string, CardGrid, Parameters<typeof diagramData>[2]]> = [
    ['polymer, automatic range', polymer, { tmin: 350, tmax: 380, rows: 41, marks: [{ x: 0.0305, label: 'batch 7, x0 = 0.0305' }] }],
    ['polymer, 0 to 1, mark near the left edge', polymer, { tmin: 350, tmax: 380, rows: 41, fullRange: true, marks: [{ x: 0.01, label: 'rinse, x0 = 0.01' }] }],
    ['polymer as A, log of 1 - x, top just above the critical point', polymerAsA, { tmin: 350, tmax: 376, rows: 41, log: 'A', marks: [{ x: 0.9999, label: 'x0 = 0.9999' }] }],
    ['polymer, log, default range', polymer, { rows: 41, log: 'B' }],
    ['lower critical point, mark near the right edge', lowerCritical, { rows: 41, marks: [{ x: 0.985, label: 'a long label for a marked composition, grade Q7 after ageing, x0 = 0.985' }] }],
    ['alloy card, top at the critical point', card, { tmin: 300, tmax: 843.6, rows: 41, marks: [{ x: 0.12, label: 'grade L, x0 = 0.12' }] }],
  ];

  test.each(cases)('%s', async (_name, grid, options) => {
    const data = diagramData(metadata, grid, options);
    const svg = await renderSvg(diagramSpec(data));
    const { size, plot, texts, symbols } = layout(svg);
    expect(plot).toMatchObject({ width: PLOT.width, height: PLOT.height });
    // Every text: axis titles and labels, title, legend, critical point, marks.
    const roles = new Set(texts.map((t) => t.role.replace(/.*(role-[\w-]+).*/, '$1')));
    for (const role of ['role-axis-title', 'role-axis-label', 'role-legend-label', 'role-title-text', 'role-mark']) expect(roles, role).toContain(role);
    // 0.5 px: resvg's glyph boxes are exact to a fraction of a pixel; a label cut off loses whole pixels.
    const tol = 0.5;
    for (const t of texts) {
      expect(t.x, `${t.text} (left)`).toBeGreaterThanOrEqual(-tol);
      expect(t.y, `${t.text} (top)`).toBeGreaterThanOrEqual(-tol);
      expect(t.x + t.width, `${t.text} (right)`).toBeLessThanOrEqual(size.width + tol);
      expect(t.y + t.height, `${t.text} (bottom)`).toBeLessThanOrEqual(size.height + tol);
    }
    // The critical points' and marks' labels inside the plot rectangle itself, clear of the axes.
    const labels = texts.filter((t) => t.role.includes('role-mark'));
    expect(labels.length).toBe(data.critical.length + data.marks.length);
    for (const t of labels) {
      expect(t.x, `${t.text} (left)`).toBeGreaterThanOrEqual(plot.x - tol);
      expect(t.y, `${t.text} (top)`).toBeGreaterThanOrEqual(plot.y - tol);
      expect(t.x + t.width, `${t.text} (right)`).toBeLessThanOrEqual(plot.x + plot.width + tol);
      expect(t.y + t.height, `${t.text} (bottom)`).toBeLessThanOrEqual(plot.y + plot.height + tol);
    }
    // The label placement reasons with `across`: the critical points are drawn where it says (vega's
    // scale and ours agree to 0.01 px, rounding of the SVG's numbers).
    expect(symbols.length).toBe(data.critical.length);
    data.critical.forEach((c, i) => {
      expect(Math.abs(symbols[i].x - plot.x - pixel(data.axis, c.x))).toBeLessThan(0.01);
    });
  }, 30_000);
});

describe('the band of a card with u() rows', () => {
  // The diagram test card with invented uncertainties: u(L0) = 0.2 kJ/mol, u(L1) = 0.15 kJ/mol, r = -0.5.
  const uncertain: CardGrid = [...card, ['u(L0)', 0.2], ['u(L1)', 0.15], ['r(L0, L1)', -0.5]];
  const data = diagramData(metadata, uncertain, { tmin: 300, tmax: 900, rows: 61 });

  test('the band is the rows of GAPBAND (k = 2) where it is defined, and none for a card without u()', () => {
    const table = (fns.gapBand(300, 900, 61, uncertain, 2) as unknown[][]);
    let shaded = 0;
    for (const [T, , lowFrom, lowTo, , highFrom, highTo] of table) {
      for (const [side, from, to] of [['low', lowFrom, lowTo], ['high', highFrom, highTo]] as const) {
        const inBand = data.band.some((b) => b.T === T && b.from === from && b.to === to && b.branch.endsWith(`band ${side}`));
        expect(inBand, `${side} band at ${T}`).toBe(typeof from === 'number');
        if (typeof from === 'number') shaded++;
      }
    }
    expect(shaded).toBeGreaterThan(40);
    // Near the critical point the band is not defined (#N/A), so it stops short of the dome's top.
    expect(Math.max(...data.band.map((b) => b.T))).toBeLessThan(data.critical[0].T);
    expect(diagramData(metadata, card, { tmin: 300, tmax: 900, rows: 61 }).band).toEqual([]);
  });

  test('mixgap diagram shades it for a CSV card with u() rows and says so', () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'mixgap-diagram-'));
    const csv = path.join(dir, 'card.csv');
    writeFileSync(csv, 'key,value\nmodel,regular\nomega,21\nenergy,kJ/mol\nu(omega),0.3\n');
    const r = spawnSync(process.execPath, [path.join(root, 'bin', 'mixgap.js'), 'diagram', csv, '-o', path.join(dir, 'pic')], { encoding: 'utf8' });
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    expect(r.stdout).toContain("the binodal's band (±2 standard uncertainties) shaded");
    expect(readFileSync(path.join(dir, 'pic.svg'), 'utf8')).toContain('±2 standard uncertainties');
  }, 30_000);

  test('the SVG shades it and says so in the legend', async () => {
    const svg = await renderSvg(diagramSpec(data));
    expect(svg).toContain('±2 standard uncertainties');
    const plain = await renderSvg(diagramSpec(diagramData(metadata, card, { tmin: 300, tmax: 900, rows: 61 })));
    expect(plain).not.toContain('standard uncertainties');
    // one area per side and stretch (vega writes each as one path of role "area mark")
    const areas = (s: string) => (s.match(/aria-roledescription="area mark"/g) ?? []).length;
    expect(areas(svg)).toBeGreaterThanOrEqual(2);
    expect(areas(plain)).toBe(0);
  }, 30_000);
});
