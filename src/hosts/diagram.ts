/**
 * Phase-diagram pictures: temperature against composition, with the binodal dome, the spinodal,
 * critical points and chosen overall compositions. Every number on the picture comes from the cell
 * functions, evaluated by the embedded engine on a parameter card (MIXGAP.GAPTABLE, TCRIT, XCRIT,
 * CRITKIND, CHECKCARD); this file only lays them out for vega-lite, renders the SVG with vega and
 * the PNG with resvg.
 */
import { createRequire } from 'module';
import path from 'path';
import { Resvg } from '@resvg/resvg-js';
import type { HyperFormula } from 'hyperformula';
import { system, type System } from '../functions/args';
import { isCard } from '../functions/card';
import type { CustomFunctionsMetadata } from './engine';
import { evaluateFormulas } from './evaluate';
import type { FormulaResult, ResultCell } from './evaluate';
import { buildMixgapEngine } from './mixgap-engine';
import { columnName, quoteSheet } from './workbook';

/** A parameter card as read from a file: rows of [key, value] (or a numeric parameter range). */
export type CardGrid = Array<Array<string | number | boolean | null>>;

export interface DiagramOptions {
  /** Temperature range in the card's temperature unit; defaults from the critical points. */
  tmin?: number;
  tmax?: number;
  /** GAPTABLE rows per gap (default 201). */
  rows?: number;
  /** Replace the card's temperature unit (K or °C): the picture is drawn in that unit. */
  temperatureUnit?: string;
  /** Overall compositions to mark with their labels. */
  marks?: Array<{ x: number; label: string }>;
  title?: string;
}

export interface DiagramPoint {
  x: number;
  T: number;
  curve: 'binodal' | 'spinodal';
  /** One line of the picture: gap, stretch of temperatures without a break, side. */
  branch: string;
}

export interface DiagramData {
  points: DiagramPoint[];
  critical: Array<{ x: number; T: number; kind: string }>;
  marks: Array<{ x: number; label: string }>;
  tmin: number;
  tmax: number;
  temperatureUnit: string;
  compositionLabel: string;
  title: string;
  /** What CHECKCARD says of the card. */
  card: string;
}

const MAX_GAPS = 4;

function isError(c: ResultCell): c is { error: string; message: string } {
  return typeof c === 'object' && c !== null;
}

function scalar(r: FormulaResult, what: string): ResultCell {
  if (Array.isArray(r)) throw new Error(`${what}: expected one value, got a table`);
  return r;
}

function numberOf(r: FormulaResult, what: string): number {
  const v = scalar(r, what);
  if (isError(v)) throw new Error(`${what}: ${v.error} ${v.message}`);
  if (typeof v !== 'number') throw new Error(`${what}: expected a number, got ${JSON.stringify(v)}`);
  return v;
}

/** The card with its temperature unit replaced (added when missing). */
export function withTemperatureUnit(grid: CardGrid, unit: string): CardGrid {
  if (!isCard(grid)) throw new Error('a temperature unit can only be chosen for a parameter card (key | value rows), not for bare parameters, which are in kelvin');
  const rows = grid.filter((row) => !(typeof row[0] === 'string' && row[0].trim().toLowerCase() === 'temperature'));
  return [...rows, ['temperature', unit]];
}

/** Puts the card on a sheet of its own in `engine` and returns the absolute range that names it. */
export function placeCard(engine: HyperFormula, grid: CardGrid, sheetName = 'Card'): string {
  const name = engine.addSheet(sheetName);
  const sheet = engine.getSheetId(name)!;
  const width = Math.max(1, ...grid.map((r) => r.length));
  const content = grid.map((row) => Array.from({ length: width }, (_, j) => {
    const v = row[j];
    return typeof v === 'string' ? `'${v}` : v ?? null; // text stays text
  }));
  engine.setSheetContent(sheet, content);
  return `${quoteSheet(name)}!$A$1:$${columnName(width - 1)}$${grid.length}`;
}

/**
 * Evaluates the diagram's data with the cell functions. `grid` is the card; the temperature range
 * and every temperature on the picture are in the card's temperature unit.
 */
export function diagramData(metadata: CustomFunctionsMetadata, grid: CardGrid, options: DiagramOptions = {}): DiagramData {
  const card = options.temperatureUnit ? withTemperatureUnit(grid, options.temperatureUnit) : grid;
  const engine = buildMixgapEngine(metadata);
  try {
    const ref = placeCard(engine, card);
    const [check, count] = evaluateFormulas(engine, [`=MIXGAP.CHECKCARD(${ref})`, `=MIXGAP.CRITCOUNT(${ref})`]);
    const checkText = scalar(check, 'CHECKCARD');
    if (isError(checkText)) throw new Error(`the parameter card is not usable: ${checkText.error} ${checkText.message}`);
    const description = String(checkText);
    const nCrit = numberOf(count, 'CRITCOUNT');

    const critFormulas: string[] = [];
    for (let n = 1; n <= nCrit; n++) critFormulas.push(`=MIXGAP.TCRIT(${ref}, ${n})`, `=MIXGAP.XCRIT(${ref}, ${n})`, `=MIXGAP.CRITKIND(${ref}, ${n})`);
    const critValues = evaluateFormulas(engine, critFormulas);
    const critical: DiagramData['critical'] = [];
    for (let n = 0; n < nCrit; n++) {
      critical.push({
        T: numberOf(critValues[3 * n], `TCRIT(card, ${n + 1})`),
        x: numberOf(critValues[3 * n + 1], `XCRIT(card, ${n + 1})`),
        kind: String(scalar(critValues[3 * n + 2], 'CRITKIND')),
      });
    }

    // Units, names and the composition variable from the card as the functions read it (the same
    // reading CHECKCARD made just above), never from CHECKCARD's sentence.
    const labels = diagramLabels(system(card));
    const unit = labels.temperatureUnit;
    const { tmin, tmax } = temperatureRange(critical, unit, options);
    const rows = options.rows ?? 201;
    if (!(Number.isInteger(rows) && rows >= 2 && rows <= 10000)) throw new Error(`rows = ${rows}: give a whole number from 2 to 10000`);

    // Near a critical point the binodal runs flat (its width grows as the square root of the distance
    // in temperature), so a second, finer table on that side closes the dome smoothly.
    const ranges: Array<[number, number, number]> = [[tmin, tmax, rows]];
    const fine = (tmax - tmin) * 0.04;
    for (const c of critical) {
      if (c.T <= tmin || c.T >= tmax) continue;
      ranges.push(c.kind === 'lower' ? [c.T, Math.min(tmax, c.T + fine), 81] : [Math.max(tmin, c.T - fine), c.T, 81]);
    }
    const points: DiagramPoint[] = [];
    for (let gap = 1; gap <= MAX_GAPS; gap++) {
      const tables = evaluateFormulas(engine, ranges.map(([from, to, n]) => `=MIXGAP.GAPTABLE(${from}, ${to}, ${n}, ${ref}, ${gap})`));
      const merged: ResultCell[][] = [];
      for (const table of tables) {
        if (!Array.isArray(table)) {
          throw new Error(`GAPTABLE: ${isError(table) ? `${table.error} ${table.message}` : JSON.stringify(table)}`);
        }
        merged.push(...table);
      }
      const found = tablePoints(merged, gap);
      const failure = merged.flat().find((c) => isError(c) && c.error !== '#N/A');
      if (found.length === 0 && failure && isError(failure)) {
        throw new Error(`GAPTABLE could not compute gap ${gap}: ${failure.error} ${failure.message}`);
      }
      if (found.length === 0) break; // this gap exists nowhere in the range
      points.push(...found);
    }

    return {
      points,
      critical: critical.filter((c) => c.T >= tmin && c.T <= tmax),
      marks: options.marks ?? [],
      tmin,
      tmax,
      temperatureUnit: unit,
      compositionLabel: labels.compositionLabel,
      title: options.title ?? labels.title,
      card: description,
    };
  } finally {
    engine.destroy();
  }
}

/** The picture's labels from the structured system: temperature unit, composition axis, title. */
export function diagramLabels(sys: System): { temperatureUnit: string; compositionLabel: string; title: string } {
  const named = sys.names.A !== 'A' || sys.names.B !== 'B';
  const fraction = sys.composition.charAt(0).toUpperCase() + sys.composition.slice(1);
  return {
    temperatureUnit: sys.temperature.name,
    compositionLabel: `${fraction} of ${sys.names.B}`,
    title: named ? `Miscibility gap, ${sys.names.A}–${sys.names.B}` : 'Miscibility gap',
  };
}

/**
 * The temperature range: as given, or from the critical points: from half the lowest critical
 * temperature (in kelvin) to 6 % above the highest, so the top of the dome has room.
 */
function temperatureRange(critical: DiagramData['critical'], unit: string, o: DiagramOptions): { tmin: number; tmax: number } {
  // A plotting default, not thermodynamics: the offset of the card's unit from kelvin.
  const offset = unit === '°C' ? 273.15 : 0;
  if ((o.tmin === undefined || o.tmax === undefined) && critical.length === 0) {
    throw new Error('the card has no critical point between 1 K and 20000 K: give the temperature range (--tmin and --tmax)');
  }
  const Ts = critical.map((c) => c.T + offset);
  const tmin = o.tmin ?? Number((Math.min(...Ts) * 0.5 - offset).toPrecision(3));
  const tmax = o.tmax ?? Number((Math.max(...Ts) * 1.06 - offset).toPrecision(3));
  if (!(tmax > tmin)) throw new Error(`the temperature range ${tmin} to ${tmax} ${unit} is empty: the maximum must exceed the minimum`);
  return { tmin, tmax };
}

/**
 * Lines of the rows of GAPTABLEs of one gap, taken in order of temperature (one row per
 * temperature): a break wherever the gap does not exist (#N/A); one line per side.
 */
function tablePoints(rows: ResultCell[][], gap: number): DiagramPoint[] {
  const points: DiagramPoint[] = [];
  let stretch = 0;
  let inside = false;
  const sorted = rows.filter((r) => typeof r[0] === 'number').sort((a, b) => (a[0] as number) - (b[0] as number))
    .filter((r, i, all) => i === 0 || r[0] !== all[i - 1][0]);
  for (const row of sorted) {
    const [T, low, high, spinLow, spinHigh] = row;
    if (typeof T !== 'number' || typeof low !== 'number' || typeof high !== 'number') {
      if (inside) stretch++;
      inside = false;
      continue;
    }
    inside = true;
    const id = `gap ${gap}, part ${stretch + 1}`;
    points.push({ x: low, T, curve: 'binodal', branch: `${id}, binodal low` });
    points.push({ x: high, T, curve: 'binodal', branch: `${id}, binodal high` });
    if (typeof spinLow === 'number' && typeof spinHigh === 'number') {
      points.push({ x: spinLow, T, curve: 'spinodal', branch: `${id}, spinodal low` });
      points.push({ x: spinHigh, T, curve: 'spinodal', branch: `${id}, spinodal high` });
    }
  }
  return points;
}

const FONT = 'DejaVu Sans';

const round = (v: number, digits = 4) => Number(v.toPrecision(digits));

/** The vega-lite specification of the picture. */
export function diagramSpec(d: DiagramData): Record<string, unknown> {
  const tTitle = `Temperature (${d.temperatureUnit})`;
  const x = { field: 'x', type: 'quantitative', title: d.compositionLabel, scale: { domain: [0, 1], nice: false, padding: 0 }, axis: { tickCount: 10 } };
  const y = { field: 'T', type: 'quantitative', title: tTitle, scale: { domain: [d.tmin, d.tmax], zero: false, nice: false, padding: 0 } };
  const layers: Record<string, unknown>[] = [
    {
      data: { values: d.points },
      mark: { type: 'line', strokeWidth: 2.2, clip: true },
      encoding: {
        x, y,
        color: { field: 'curve', type: 'nominal', title: null, scale: { domain: ['binodal', 'spinodal'], range: ['#1b4f9c', '#c0392b'] } },
        strokeDash: { field: 'curve', type: 'nominal', title: null, scale: { domain: ['binodal', 'spinodal'], range: [[1, 0], [7, 4]] } },
        detail: { field: 'branch' },
        order: { field: 'T', type: 'quantitative' },
      },
    },
  ];
  if (d.critical.length > 0) {
    const crit = d.critical.map((c) => ({ ...c, label: `${c.kind} critical point: ${round(c.T)} ${d.temperatureUnit}, x = ${round(c.x, 3)}` }));
    layers.push(
      { data: { values: crit }, mark: { type: 'point', filled: true, size: 90, color: 'black', shape: 'circle' }, encoding: { x, y } },
      {
        data: { values: crit },
        mark: { type: 'text', align: 'center', baseline: 'bottom', dy: -9, fontSize: 12, color: 'black' },
        encoding: { x, y, text: { field: 'label' } },
      },
    );
  }
  if (d.marks.length > 0) {
    layers.push(
      { data: { values: d.marks }, mark: { type: 'rule', color: '#2e7d32', strokeWidth: 1.5, strokeDash: [2, 3] }, encoding: { x } },
      {
        data: { values: d.marks.map((m) => ({ ...m, T: d.tmin })) },
        mark: { type: 'text', align: 'left', baseline: 'bottom', angle: 270, dx: 6, dy: -4, fontSize: 11, color: '#2e7d32' },
        encoding: { x, y, text: { field: 'label' } },
      },
    );
  }
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: { text: d.title, subtitle: wrap(d.card, 95), subtitleFontSize: 10, anchor: 'start' },
    width: 640,
    height: 440,
    background: 'white',
    config: { font: FONT, axis: { labelFontSize: 12, titleFontSize: 13, grid: true, gridOpacity: 0.35 }, legend: { labelFontSize: 12, orient: 'bottom', direction: 'horizontal' } },
    layer: layers,
  };
}

/** Text cut into lines of at most `width` characters at spaces. */
function wrap(text: string, width: number): string[] {
  const lines: string[] = [];
  let line = '';
  for (const word of text.split(/\s+/)) {
    if (line && line.length + 1 + word.length > width) {
      lines.push(line);
      line = word;
    } else line = line ? `${line} ${word}` : word;
  }
  if (line) lines.push(line);
  return lines;
}

// vega and vega-lite are ES modules (with top-level await): loaded with import(), not require().
const importEsm = (name: string) => import(/* webpackIgnore: true */ name);

/** The picture as SVG text (vega's headless SVG renderer). */
export async function renderSvg(spec: Record<string, unknown>): Promise<string> {
  const vl = await importEsm('vega-lite');
  const vega = await importEsm('vega');
  const compiled = vl.compile(spec).spec;
  const view = new vega.View(vega.parse(compiled), { renderer: 'none', logLevel: vega.Warn });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}

/** The TTF files the PNG is drawn with (from the dejavu-fonts-ttf package, never the system's). */
export function fontFiles(): string[] {
  const dir = path.join(path.dirname(createRequire(__filename).resolve('dejavu-fonts-ttf/package.json')), 'ttf');
  return ['DejaVuSans.ttf', 'DejaVuSans-Bold.ttf', 'DejaVuSans-Oblique.ttf'].map((f) => path.join(dir, f));
}

/** The SVG as a PNG at `scale` times its size, text drawn with the packaged DejaVu fonts. */
export function renderPng(svg: string, scale = 2): Buffer {
  const resvg = new Resvg(svg, {
    fitTo: { mode: 'zoom', value: scale },
    background: 'white',
    font: { fontFiles: fontFiles(), loadSystemFonts: false, defaultFontFamily: FONT, sansSerifFamily: FONT },
  });
  return resvg.render().asPng();
}
