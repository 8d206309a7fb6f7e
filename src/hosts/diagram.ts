/**
 * Phase-diagram pictures: temperature against composition, with the binodal dome, the spinodal,
 * critical points and chosen overall compositions. Every number on the picture comes from the cell
 * functions, evaluated by the embedded engine on a parameter card (MIXGAP.GAPTABLE, TCRIT, XCRIT,
 * CRITKIND, CHECKCARD; MIXGAP.GAPBAND for the band of a card that carries u() rows); this file only
 * lays them out for vega-lite, renders the SVG with vega and the PNG with resvg.
 */
import { createRequire } from 'module';
import path from 'path';
import { Resvg } from '@resvg/resvg-js';
import type { HyperFormula } from 'hyperformula';
import { system, type System } from '../functions/args';
import { isCard } from '../functions/card';
import { GAPTABLE_ROWS } from '../functions/shapes';
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
  /** Draw the whole composition range 0 to 1 instead of the automatic range. */
  fullRange?: boolean;
  /**
   * A logarithmic composition axis of the fraction of this component: "B" (x itself, for a dilute
   * branch near x = 0) or "A" (1 - x, for one near x = 1); the card's component names also do.
   */
  log?: string;
}

/**
 * The composition axis: which fraction it shows (B: x; A: 1 - x), on which scale, over which
 * domain (in the fraction shown, low to high; an A axis is drawn reversed, so that A-rich
 * compositions stay on the left as on the linear axis).
 */
export interface CompositionAxis {
  scale: 'linear' | 'log';
  component: 'A' | 'B';
  domain: [number, number];
  title: string;
}

export interface DiagramPoint {
  x: number;
  T: number;
  curve: 'binodal' | 'spinodal';
  /** One line of the picture: gap, stretch of temperatures without a break, side. */
  branch: string;
}

/** One row of the band around one binodal branch: low - k u to low + k u at T. */
export interface BandPoint {
  T: number;
  from: number;
  to: number;
  /** One shaded area: gap, stretch of temperatures without a break, side. */
  branch: string;
}

/** The band drawn around the binodal of a card with u() rows, in standard uncertainties. */
export const BAND_K = 2;

/** What the band's legend entry says. */
export const BAND_LABEL = `±${BAND_K} standard uncertainties`;

/** Most GAPBAND rows per gap: the band is smooth and undefined near a critical point, where rows cost most. */
const BAND_ROWS = 101;

export interface DiagramData {
  points: DiagramPoint[];
  /** The band around the binodal (a card with u() rows), else empty. */
  band: BandPoint[];
  critical: Array<{ x: number; T: number; kind: string }>;
  marks: Array<{ x: number; label: string }>;
  tmin: number;
  tmax: number;
  temperatureUnit: string;
  compositionLabel: string;
  /** The composition axis the picture is drawn on. */
  axis: CompositionAxis;
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
    const sys = system(card);
    const labels = diagramLabels(sys);
    const logComponent = options.log === undefined ? undefined : componentOf(options.log, sys);
    if (logComponent && options.fullRange) {
      throw new Error('a logarithmic axis cannot show x = 0 or x = 1: choose either the full range 0 to 1 (--full-range) or the log axis (--log)');
    }
    const unit = labels.temperatureUnit;
    const { tmin, tmax } = temperatureRange(critical, unit, options);
    const rows = options.rows ?? 201;
    if (!(Number.isInteger(rows) && rows >= GAPTABLE_ROWS.min && rows <= GAPTABLE_ROWS.max)) throw new Error(`rows = ${rows}: give a whole number from ${GAPTABLE_ROWS.min} to ${GAPTABLE_ROWS.max}`);

    // Near a critical point the binodal runs flat (its width grows as the square root of the distance
    // in temperature), so a second, finer table on that side closes the dome smoothly.
    const ranges: Array<[number, number, number]> = [[tmin, tmax, rows]];
    const fine = (tmax - tmin) * 0.04;
    for (const c of critical) {
      if (c.T <= tmin || c.T >= tmax) continue;
      ranges.push(c.kind === 'lower' ? [c.T, Math.min(tmax, c.T + fine), 81] : [Math.max(tmin, c.T - fine), c.T, 81]);
    }
    const points: DiagramPoint[] = [];
    const band: BandPoint[] = [];
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
      if (sys.uncertainty) {
        const [table] = evaluateFormulas(engine, [`=MIXGAP.GAPBAND(${tmin}, ${tmax}, ${Math.min(rows, BAND_ROWS)}, ${ref}, ${BAND_K}, ${gap})`]);
        if (!Array.isArray(table)) throw new Error(`GAPBAND: ${isError(table) ? `${table.error} ${table.message}` : JSON.stringify(table)}`);
        band.push(...bandPoints(table, gap));
      }
    }

    const shownCritical = critical.filter((c) => c.T >= tmin && c.T <= tmax);
    const marks = options.marks ?? [];
    const xs = [...points.map((p) => p.x), ...shownCritical.map((c) => c.x), ...marks.map((m) => m.x)];
    const axis: CompositionAxis = logComponent
      ? { scale: 'log', component: logComponent, domain: logDomain(xs.map((x) => (logComponent === 'A' ? 1 - x : x))), title: `${logComponent === 'A' ? labels.compositionLabelA : labels.compositionLabel} (log scale${logComponent === 'A' ? ', falling to the right' : ''})` }
      : { scale: 'linear', component: 'B', domain: options.fullRange ? [0, 1] : linearDomain(xs), title: labels.compositionLabel };
    return {
      points,
      band,
      critical: shownCritical,
      marks,
      tmin,
      tmax,
      temperatureUnit: unit,
      compositionLabel: labels.compositionLabel,
      axis,
      title: options.title ?? labels.title,
      card: description,
    };
  } finally {
    engine.destroy();
  }
}

/** The picture's labels from the structured system: temperature unit, composition axis, title. */
export function diagramLabels(sys: System): { temperatureUnit: string; compositionLabel: string; compositionLabelA: string; title: string } {
  const named = sys.names.A !== 'A' || sys.names.B !== 'B';
  const fraction = sys.composition.charAt(0).toUpperCase() + sys.composition.slice(1);
  return {
    temperatureUnit: sys.temperature.name,
    compositionLabel: `${fraction} of ${sys.names.B}`,
    compositionLabelA: `${fraction} of ${sys.names.A}`,
    title: named ? `Miscibility gap, ${sys.names.A}–${sys.names.B}` : 'Miscibility gap',
  };
}

/** The component a --log option names: "A", "B" or one of the card's component names. */
function componentOf(text: string, sys: System): 'A' | 'B' {
  const t = text.trim().toLowerCase();
  if (t === 'b' || t === sys.names.B.toLowerCase()) return 'B';
  if (t === 'a' || t === sys.names.A.toLowerCase()) return 'A';
  const names = sys.names.A !== 'A' || sys.names.B !== 'B' ? ` (or ${sys.names.B}, ${sys.names.A})` : '';
  throw new Error(`--log ${text}: give the component whose fraction the log axis shows, B (x, for a dilute branch near x = 0) or A (1 - x, near x = 1)${names}`);
}

/** The 1-2-5 step (times a power of ten) nearest above `raw`. */
function niceStep(raw: number): number {
  const decade = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].find((m) => m * decade >= raw * (1 - 1e-9))!;
  return step * decade;
}

/** k * step without the binary noise of the product (0.30000000000000004 -> 0.3). */
const multiple = (k: number, step: number) => Number((k * step).toPrecision(12));

/**
 * The automatic linear composition range: every composition on the picture (binodal, spinodal,
 * critical points, marks) with a margin of 5 % of their spread on each side, widened to whole
 * ticks of a 1-2-5 step (ten or so across), within 0 to 1. A plotting rule, common practice.
 */
export function linearDomain(xs: number[]): [number, number] {
  const finite = xs.filter((x) => Number.isFinite(x));
  if (finite.length === 0) return [0, 1];
  const lo = Math.min(...finite);
  const hi = Math.max(...finite);
  const margin = Math.max(0.05 * (hi - lo), 0.005);
  const from = Math.max(0, lo - margin);
  const to = Math.min(1, hi + margin);
  const step = niceStep((to - from) / 12);
  return [Math.max(0, multiple(Math.floor(from / step + 1e-9), step)), Math.min(1, multiple(Math.ceil(to / step - 1e-9), step))];
}

/** The most decades a log axis spans: smaller compositions run off its low end. */
export const LOG_DECADES = 10;

/**
 * The automatic logarithmic range of the fractions `vs` (x, or 1 - x on an A axis): from the
 * decade below the smallest (a tenth of a decade of margin) to the 1-2-5 value above the largest
 * (capped at 1), at most LOG_DECADES decades; fractions of 0 cannot be shown and are left out.
 */
export function logDomain(vs: number[]): [number, number] {
  const positive = vs.filter((v) => v > 0 && Number.isFinite(v));
  if (positive.length === 0) throw new Error('nothing on the picture has a composition a logarithmic axis can show: draw it on the linear axis (leave out --log)');
  const hi = Math.min(1, niceStep(Math.max(...positive) * 10 ** 0.05));
  const lowest = Math.floor(Math.log10(Math.min(...positive)) - 0.1);
  const top = Math.ceil(Math.log10(hi) - 1e-9);
  return [Number(`1e${Math.max(lowest, top - LOG_DECADES)}`), hi];
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

/**
 * Shaded stretches of the rows of a GAPBAND (T, low, low - k u, low + k u, high, high - k u,
 * high + k u): a break wherever a band is not defined (#N/A); one area per side.
 */
function bandPoints(rows: ResultCell[][], gap: number): BandPoint[] {
  const out: BandPoint[] = [];
  for (const [side, col] of [['low', 2], ['high', 5]] as const) {
    let stretch = 0;
    let inside = false;
    for (const row of rows) {
      const [T, from, to] = [row[0], row[col], row[col + 1]];
      if (typeof T !== 'number' || typeof from !== 'number' || typeof to !== 'number') {
        if (inside) stretch++;
        inside = false;
        continue;
      }
      inside = true;
      out.push({ T, from, to, branch: `gap ${gap}, part ${stretch + 1}, band ${side}` });
    }
  }
  return out;
}

const FONT = 'DejaVu Sans';

const round = (v: number, digits = 4) => Number(v.toPrecision(digits));

/** The size of the plot (the data rectangle inside the axes), in SVG pixels. */
export const PLOT = { width: 640, height: 440 };

/** The fraction the composition axis shows for a composition x (x itself, or 1 - x on an A axis). */
function shown(axis: CompositionAxis, x: number): number {
  return axis.component === 'A' ? 1 - x : x;
}

/** Where a shown fraction lies across the plot: 0 at the left edge, 1 at the right edge. */
export function across(axis: CompositionAxis, v: number): number {
  const [lo, hi] = axis.domain;
  const t = axis.scale === 'log' ? Math.log10(v / lo) / Math.log10(hi / lo) : (v - lo) / (hi - lo);
  return axis.component === 'A' ? 1 - t : t;
}

/**
 * The ticks of a log axis over `domain`: its decades (and 2 and 5 times them when it spans two
 * decades or less), and its top when that is not a decade and lies at least 40 pixels from the
 * last one, so that no two labels overlap.
 */
export function logTicks([lo, hi]: [number, number]): number[] {
  const first = Math.ceil(Math.log10(lo) - 1e-9);
  const last = Math.floor(Math.log10(hi) + 1e-9);
  const decades = Math.log10(hi / lo);
  const steps = decades <= 2 + 1e-9 ? [1, 2, 5] : [1];
  const ticks: number[] = [];
  for (let k = first - 1; k <= last; k++) {
    for (const m of steps) {
      const t = Number(`${m}e${k}`);
      if (t >= lo * (1 - 1e-9) && t <= hi * (1 + 1e-9)) ticks.push(t);
    }
  }
  const gap = (Math.log10(hi) - Math.log10(ticks[ticks.length - 1] ?? lo)) / decades * PLOT.width;
  if (ticks.length === 0 || gap >= 40) ticks.push(hi);
  return ticks;
}

/** Where a temperature lies down the plot: 0 at the top edge, 1 at the bottom edge. */
const down = (d: DiagramData, T: number) => (d.tmax - T) / (d.tmax - d.tmin);

/** Width of a line of DejaVu Sans text, estimated generously (its advance is about 0.55 em on average). */
const textWidth = (text: string, fontSize: number) => text.length * fontSize * 0.62;

/**
 * Where a critical point's label goes: above the point for an upper critical point (the gap lies
 * below), beneath it for a lower one, on the other side when the edge is too near; centred on the
 * point, or starting (ending) at it when a centred label would cross the left (right) edge.
 */
function criticalLabelMark(d: DiagramData, c: DiagramData['critical'][number], label: string): Record<string, unknown> {
  const fontSize = 12;
  const px = across(d.axis, shown(d.axis, c.x)) * PLOT.width;
  const py = down(d, c.T) * PLOT.height;
  const w = textWidth(label, fontSize);
  const align = px - w / 2 < 4 ? 'left' : px + w / 2 > PLOT.width - 4 ? 'right' : 'center';
  const dx = align === 'left' ? Math.max(-4, 2 - px) : align === 'right' ? Math.min(4, PLOT.width - 2 - px) : 0;
  const room = 9 + fontSize + 2;
  const above = c.kind === 'lower' ? py + room > PLOT.height : py - room >= 0;
  return {
    type: 'text', align, dx, baseline: above ? 'bottom' : 'top', dy: above ? -9 : 9,
    fontSize, color: 'black', limit: PLOT.width - 8,
  };
}

/** The label of a marked composition runs up its rule from the bottom, on its left (on its right near the left edge). */
function markLabelMark(d: DiagramData, x: number): Record<string, unknown> {
  const fontSize = 11;
  const px = across(d.axis, shown(d.axis, x)) * PLOT.width;
  const left = px >= fontSize + 8;
  return {
    type: 'text', align: 'left', angle: 270, dx: 6, baseline: left ? 'bottom' : 'top', dy: left ? -4 : 4,
    fontSize, color: '#2e7d32', limit: PLOT.height - 12,
  };
}

/** The vega-lite specification of the picture. */
export function diagramSpec(d: DiagramData): Record<string, unknown> {
  const tTitle = `Temperature (${d.temperatureUnit})`;
  const { axis } = d;
  const [lo, hi] = axis.domain;
  // On a log axis a fraction below the axis (or of 0) is drawn far off its low end and cut off there,
  // so that the line still runs to the edge.
  const v = (x: number) => (axis.scale === 'log' ? Math.max(shown(axis, x), lo * 1e-6) : shown(axis, x));
  const inside = (x: number) => { const t = across(axis, shown(axis, x)); return t >= -1e-9 && t <= 1 + 1e-9; };
  const scale = axis.scale === 'log'
    ? { type: 'log', domain: [lo, hi], nice: false, reverse: axis.component === 'A' }
    : { type: 'linear', domain: [lo, hi], nice: false, zero: false, padding: 0 };
  // A log axis is labelled at the ticks of logTicks: 0.001 and above as decimals, smaller
  // fractions as powers of ten (1e-5).
  const xAxis = axis.scale === 'log'
    ? { values: logTicks(axis.domain), labelExpr: "datum.value >= 0.001 ? format(datum.value, '~g') : format(datum.value, '.0e')", labelOverlap: false }
    : { tickCount: 10 };
  const x = { field: 'v', type: 'quantitative', title: axis.title, scale, axis: xAxis };
  const y = { field: 'T', type: 'quantitative', title: tTitle, scale: { domain: [d.tmin, d.tmax], zero: false, nice: false, padding: 0 } };
  const layers: Record<string, unknown>[] = [];
  if (d.band.length > 0) {
    // Under the lines: a horizontal area from low - k u to low + k u at each temperature (rows in
    // order of T; an `order` channel would mean stacking order for an area, not path order).
    layers.push({
      data: { values: [...d.band].sort((a, b) => a.T - b.T).map((b) => ({ ...b, v: v(b.from), v2: v(b.to), what: BAND_LABEL })) },
      mark: { type: 'area', orient: 'horizontal', opacity: 0.22, clip: true },
      encoding: {
        x, x2: { field: 'v2' }, y,
        fill: { field: 'what', type: 'nominal', title: null, scale: { domain: [BAND_LABEL], range: ['#1b4f9c'] } },
        detail: { field: 'branch' },
      },
    });
  }
  layers.push(
    {
      data: { values: d.points.map((p) => ({ ...p, v: v(p.x) })) },
      mark: { type: 'line', strokeWidth: 2.2, clip: true },
      encoding: {
        x, y,
        color: { field: 'curve', type: 'nominal', title: null, scale: { domain: ['binodal', 'spinodal'], range: ['#1b4f9c', '#c0392b'] } },
        strokeDash: { field: 'curve', type: 'nominal', title: null, scale: { domain: ['binodal', 'spinodal'], range: [[1, 0], [7, 4]] } },
        detail: { field: 'branch' },
        order: { field: 'T', type: 'quantitative' },
      },
    },
  );
  const critical = d.critical.filter((c) => inside(c.x));
  if (critical.length > 0) {
    const crit = critical.map((c) => ({ ...c, v: v(c.x), label: `${c.kind} critical point: ${round(c.T)} ${d.temperatureUnit}, x = ${round(c.x, 3)}` }));
    layers.push({ data: { values: crit }, mark: { type: 'point', filled: true, size: 90, color: 'black', shape: 'circle' }, encoding: { x, y } });
    for (const c of crit) {
      layers.push({ data: { values: [c] }, mark: criticalLabelMark(d, c, c.label), encoding: { x, y, text: { field: 'label' } } });
    }
  }
  const marks = d.marks.filter((m) => inside(m.x)).map((m) => ({ ...m, v: v(m.x), T: d.tmin }));
  if (marks.length > 0) {
    layers.push({ data: { values: marks }, mark: { type: 'rule', color: '#2e7d32', strokeWidth: 1.5, strokeDash: [2, 3] }, encoding: { x } });
    for (const m of marks) {
      layers.push({ data: { values: [m] }, mark: markLabelMark(d, m.x), encoding: { x, y, text: { field: 'label' } } });
    }
  }
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: { text: d.title, subtitle: wrap(d.card, 95), subtitleFontSize: 10, anchor: 'start' },
    width: PLOT.width,
    height: PLOT.height,
    background: 'white',
    config: { font: FONT, axis: { labelFontSize: 12, titleFontSize: 13, grid: true, gridOpacity: 0.35 }, legend: { labelFontSize: 12, labelLimit: 320, orient: 'bottom', direction: 'horizontal' } },
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
