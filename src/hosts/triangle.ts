/**
 * Composition-triangle pictures of a three-component card at one temperature: the binodal curve
 * and its tie-lines, plait points, three-phase triangles and marked feeds with the phases they
 * split into, and the stages of a counter-current cascade. Every number comes from the cell
 * functions, evaluated by the embedded engine on the card (MIXGAP.TBINODAL, TPLAIT, TTRIANGLE,
 * TSPLIT, TSTAGETABLE, CHECKCARD); this file only lays them out as an
 * SVG drawn by hand (vega-lite has no triangular axes) and renders the PNG as the binary pictures
 * are rendered (resvg, the packaged DejaVu fonts).
 *
 * Plot coordinates of a composition (A bottom left, B bottom right, C at the top):
 *   X = x_B + x_C / 2,   Y = (sqrt(3) / 2) x_C
 */
import { writeFileSync } from 'fs';
import { isTernaryCard, ternarySystem } from '../functions/ternaryCard';
import type { CardGrid } from './diagram';
import { placeCard, renderPng } from './diagram';
import type { CustomFunctionsMetadata } from './engine';
import { evaluateFormulas } from './evaluate';
import type { FormulaResult, ResultCell } from './evaluate';
import { buildMixgapEngine } from './mixgap-engine';

/** A composition: x_A, x_B, x_C. */
export type Composition = [number, number, number];

export interface TriangleOptions {
  /** Temperature, in the card's temperature unit. */
  T: number;
  /** Feeds to mark: x_B, x_C and a label. */
  feeds?: Array<{ xB: number; xC: number; label: string }>;
  /** A counter-current cascade to draw stage by stage (TSTAGETABLE). */
  cascade?: CascadeSpec;
  /** TBINODAL rows (default 121). */
  rows?: number;
  title?: string;
}

/** A counter-current cascade: feed and solvent (x_B, x_C), the solvent-to-feed ratio or both amounts, stages, solute. */
export interface CascadeSpec {
  feed: [number, number];
  solvent: [number, number];
  /** One number (solvent-to-feed ratio) or two (feed and solvent amounts). */
  amounts: number[];
  stages: number;
  solute: string;
}

/** One stage of a drawn cascade: the raffinate and the extract leaving it, with their amounts. */
export interface CascadeStage {
  raffinate: Composition;
  R: number;
  extract: Composition;
  E: number;
}

export interface TriangleData {
  /** Names of A, B, C (the card's, or A, B, C). */
  names: [string, string, string];
  /** The symbol of a fraction: x (mole fractions) or φ (volume fractions). */
  symbol: string;
  T: number;
  temperatureUnit: string;
  title: string;
  /** What CHECKCARD says of the card. */
  card: string;
  /** Branches of the binodal curve (TBINODAL rows between #N/A rows): both ends of each tie-line. */
  branches: Array<Array<[Composition, Composition]>>;
  plaits: Composition[];
  triangles: Array<[Composition, Composition, Composition]>;
  feeds: Array<{ feed: Composition; label: string; phases: Composition[] }>;
  /** The cascade of --cascade: feed, solvent and the stages 1 ... N (TSTAGETABLE rows). */
  cascade?: { feed: Composition; solvent: Composition; stages: CascadeStage[] };
  /** Why no binodal curve is drawn (TBINODAL's #N/A message), if none is. */
  noCurve?: string;
}

const isError = (c: ResultCell): c is { error: string; message: string } => typeof c === 'object' && c !== null;

function table(r: FormulaResult, what: string): ResultCell[][] {
  if (!Array.isArray(r)) {
    if (isError(r)) throw new Error(`${what}: ${r.error} ${r.message}`);
    throw new Error(`${what}: expected a table, got ${JSON.stringify(r)}`);
  }
  return r;
}

const composition = (cells: ResultCell[], what: string): Composition => {
  if (!cells.every((c) => typeof c === 'number')) throw new Error(`${what}: expected three fractions, got ${JSON.stringify(cells)}`);
  return cells as Composition;
};

/** The picture's data, every number from the cell functions through the embedded engine. */
export function triangleData(metadata: CustomFunctionsMetadata, grid: CardGrid, options: TriangleOptions): TriangleData {
  const sys = ternarySystem(grid);
  const engine = buildMixgapEngine(metadata);
  try {
    const card = placeCard(engine, grid);
    const T = options.T, rows = options.rows ?? 121;
    const feeds = options.feeds ?? [];
    const formulas = [
      `=MIXGAP.CHECKCARD(${card})`,
      `=MIXGAP.TBINODAL(${T}, ${card}, ${rows})`,
      ...[1, 2, 3].map((n) => `=MIXGAP.TPLAIT(${T}, ${card}, ${n})`),
      ...[1, 2].map((n) => `=MIXGAP.TTRIANGLE(${T}, ${card}, ${n})`),
      ...feeds.map((f) => `=MIXGAP.TSPLIT(${f.xB}, ${f.xC}, ${T}, ${card})`),
      ...(options.cascade ? [stageTableFormula(options.cascade, T, card)] : []),
    ];
    const got = evaluateFormulas(engine, formulas);
    const check = got[0];
    if (isError(check as ResultCell)) throw new Error(`the card: ${(check as { error: string; message: string }).error} ${(check as { message: string }).message}`);
    // TBINODAL: branches between #N/A rows; #N/A alone (no gap on any edge) draws no curve
    const branches: TriangleData['branches'] = [];
    let noCurve: string | undefined;
    const bin = got[1];
    const binFirst = Array.isArray(bin) ? bin[0]?.[0] : bin;
    if (binFirst !== undefined && isError(binFirst) && binFirst.error === '#N/A' && (!Array.isArray(bin) || bin.every((r) => r.every(isError)))) noCurve = binFirst.message;
    else {
      let branch: Array<[Composition, Composition]> = [];
      for (const r of table(bin, 'TBINODAL')) {
        if (r.some(isError)) {
          if (branch.length) branches.push(branch);
          branch = [];
          continue;
        }
        branch.push([composition(r.slice(0, 3), 'TBINODAL'), composition(r.slice(3, 6), 'TBINODAL')]);
      }
      if (branch.length) branches.push(branch);
    }
    // TPLAIT n, TTRIANGLE n: until the first #N/A
    const upTo = (results: FormulaResult[], what: string) => {
      const out: ResultCell[][][] = [];
      for (const r of results) {
        const first = Array.isArray(r) ? r[0]?.[0] : r;
        if (first !== undefined && isError(first) && first.error === '#N/A') break;
        out.push(table(r, what));
      }
      return out;
    };
    const plaits = upTo(got.slice(2, 5), 'TPLAIT').map((t) => composition(t[0], 'TPLAIT'));
    const triangles = upTo(got.slice(5, 7), 'TTRIANGLE').map((t) => t.map((r) => composition(r, 'TTRIANGLE')) as [Composition, Composition, Composition]);
    const marked = feeds.map((f, i) => {
      const phases = table(got[7 + i], `--feed ${f.xB},${f.xC}`).filter((r) => typeof r[0] === 'number').map((r) => composition(r.slice(0, 3), 'TSPLIT'));
      return { feed: [1 - f.xB - f.xC, f.xB, f.xC] as Composition, label: f.label, phases };
    });
    let cascade: TriangleData['cascade'];
    if (options.cascade) {
      const c = options.cascade;
      const rows = table(got[7 + feeds.length], '--cascade (TSTAGETABLE)');
      const stages = rows.map((r) => {
        const e = r.find(isError);
        if (e) throw new Error(`--cascade (TSTAGETABLE): ${e.error} ${e.message}`); // a refused cascade spills its error
        if (!r.every((v) => typeof v === 'number')) throw new Error(`--cascade (TSTAGETABLE): expected numbers, got ${JSON.stringify(r)}`);
        const v = r as number[];
        return { raffinate: [v[0], v[1], v[2]], R: v[3], extract: [v[4], v[5], v[6]], E: v[7] } as CascadeStage;
      });
      const corner = (p: [number, number]): Composition => [1 - p[0] - p[1], p[0], p[1]];
      cascade = { feed: corner(c.feed), solvent: corner(c.solvent), stages };
    }
    const names: [string, string, string] = [sys.names.A, sys.names.B, sys.names.C];
    return {
      names, symbol: sys.composition === 'volume fraction' ? 'φ' : 'x', T, temperatureUnit: sys.temperature.name,
      title: options.title ?? `${names.join(' – ')} at ${T} ${sys.temperature.name}`,
      card: String(check), branches, plaits, triangles, feeds: marked, cascade, noCurve,
    };
  } finally {
    engine.destroy();
  }
}

/** The TSTAGETABLE formula of a cascade: literal arrays, so that the engine can size the spill from the stage count. */
export function stageTableFormula(c: CascadeSpec, T: number, card: string): string {
  const amounts = c.amounts.length === 1 ? String(c.amounts[0]) : `{${c.amounts.join(',')}}`;
  return `=MIXGAP.TSTAGETABLE({${c.feed.join(',')}}, {${c.solvent.join(',')}}, ${amounts}, ${c.stages}, "${c.solute.replace(/"/g, '""')}", ${T}, ${card})`;
}

// ---------------------------------------------------------------------------------------------
// The picture

export const PICTURE = { width: 660, height: 700 };
/** Height added below for a cascade (a second legend row and its note). */
const CASCADE_EXTRA = 40;
/** The triangle: corner A at (LEFT, BASE), side SIDE pixels. */
const LEFT = 70, SIDE = 520, BASE = 560;
const H = (Math.sqrt(3) / 2) * SIDE;
const FONT = 'DejaVu Sans';

/** Pixel position of a composition (x_B, x_C): X = x_B + x_C / 2, Y = (sqrt(3) / 2) x_C. */
export function pixel(p: Composition): [number, number] {
  return [LEFT + SIDE * (p[1] + p[2] / 2), BASE - H * p[2]];
}

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
const f1 = (v: number) => v.toFixed(1);
const pts = (ps: Composition[]) => ps.map((p) => pixel(p).map(f1).join(',')).join(' ');

function text(x: number, y: number, s: string, o: { size?: number; anchor?: string; color?: string; weight?: string; rotate?: number } = {}): string {
  const rot = o.rotate ? ` transform="rotate(${o.rotate} ${f1(x)} ${f1(y)})"` : '';
  return `<text x="${f1(x)}" y="${f1(y)}" font-family="${FONT}" font-size="${o.size ?? 12}" text-anchor="${o.anchor ?? 'start'}" fill="${o.color ?? 'black'}"${o.weight ? ` font-weight="${o.weight}"` : ''}${rot}>${esc(s)}</text>`;
}

/** Tie-lines drawn per branch (at most; evenly picked from its rows). */
const TIES_SHOWN = 14;

const COLORS = { binodal: '#1565c0', tie: '#90a4ae', plait: '#c62828', triangle: '#ffe082', feed: '#2e7d32', grid: '#e0e0e0', cascade: '#6a1b9a' };

/** The picture as SVG text. */
export function triangleSvg(d: TriangleData): string {
  const out: string[] = [];
  const { width } = PICTURE, height = PICTURE.height + (d.cascade ? CASCADE_EXTRA : 0);
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}">`);
  out.push(`<rect width="${width}" height="${height}" fill="white"/>`);
  out.push(text(width / 2, 26, d.title, { size: 15, anchor: 'middle', weight: 'bold' }));
  out.push(text(width / 2, 46, d.card.length > 110 ? `${d.card.slice(0, 107)}...` : d.card, { size: 10, anchor: 'middle', color: '#555555' }));
  const [nA, nB, nC] = d.names, s = d.symbol;
  const A: Composition = [1, 0, 0], B: Composition = [0, 1, 0], C: Composition = [0, 0, 1];
  // grid every 0.1 and tick labels every 0.2, one side per component
  for (let k = 1; k < 10; k++) {
    const v = k / 10;
    out.push(`<polyline points="${pts([[1 - v, 0, v], [0, 1 - v, v]])}" stroke="${COLORS.grid}" fill="none"/>`);
    out.push(`<polyline points="${pts([[1 - v, v, 0], [0, v, 1 - v]])}" stroke="${COLORS.grid}" fill="none"/>`);
    out.push(`<polyline points="${pts([[v, 1 - v, 0], [v, 0, 1 - v]])}" stroke="${COLORS.grid}" fill="none"/>`);
    if (k % 2 === 0) {
      const [bx, by] = pixel([1 - v, v, 0]);
      out.push(text(bx, by + 16, v.toFixed(1), { size: 11, anchor: 'middle' }));
      const [cx, cy] = pixel([0, 1 - v, v]);
      out.push(text(cx + 8, cy + 4, v.toFixed(1), { size: 11 }));
      const [ax, ay] = pixel([v, 0, 1 - v]);
      out.push(text(ax - 8, ay + 4, v.toFixed(1), { size: 11, anchor: 'end' }));
    }
  }
  out.push(`<polygon points="${pts([A, B, C])}" fill="none" stroke="black" stroke-width="1.2"/>`);
  // corners and side titles, named by the card's components
  const [axp, ayp] = pixel(A), [bxp, byp] = pixel(B), [cxp, cyp] = pixel(C);
  out.push(text(axp - 6, ayp + 34, nA, { size: 13, anchor: 'middle', weight: 'bold' }));
  out.push(text(bxp + 6, byp + 34, nB, { size: 13, anchor: 'middle', weight: 'bold' }));
  out.push(text(cxp, cyp - 12, nC, { size: 13, anchor: 'middle', weight: 'bold' }));
  out.push(text((axp + bxp) / 2, ayp + 36, `${s}_B, ${nB} →`, { size: 12, anchor: 'middle' }));
  const rm = pixel([0, 0.5, 0.5]), lm = pixel([0.5, 0, 0.5]);
  out.push(text(rm[0] + 48, rm[1] - 28, `${s}_C, ${nC} →`, { size: 12, anchor: 'middle', rotate: -60 }));
  out.push(text(lm[0] - 48, lm[1] - 28, `← ${s}_A, ${nA}`, { size: 12, anchor: 'middle', rotate: 60 }));
  // three-phase triangles
  for (const t of d.triangles) out.push(`<polygon class="three-phase" points="${pts(t)}" fill="${COLORS.triangle}" fill-opacity="0.7" stroke="#ff8f00" stroke-width="1.2"/>`);
  // tie-lines, then the binodal curve over them
  for (const b of d.branches) {
    const step = Math.max(1, Math.round((b.length - 1) / TIES_SHOWN));
    for (let i = 0; i < b.length; i += step) {
      const [p, q] = b[i];
      if (p.every((v, k) => v === q[k])) continue;
      out.push(`<polyline class="tie-line" points="${pts([p, q])}" stroke="${COLORS.tie}" stroke-width="0.9" fill="none"/>`);
    }
  }
  for (const b of d.branches) {
    out.push(`<polyline class="binodal" points="${pts(b.map((r) => r[0]))}" stroke="${COLORS.binodal}" stroke-width="2" fill="none"/>`);
    out.push(`<polyline class="binodal" points="${pts(b.map((r) => r[1]))}" stroke="${COLORS.binodal}" stroke-width="2" fill="none"/>`);
  }
  for (const p of d.plaits) {
    const [x, y] = pixel(p);
    out.push(`<circle class="plait" cx="${f1(x)}" cy="${f1(y)}" r="4.5" fill="${COLORS.plait}"/>`);
    out.push(text(x + 8, y - 6, 'plait point', { size: 11, color: COLORS.plait }));
  }
  for (const f of d.feeds) {
    const [x, y] = pixel(f.feed);
    if (f.phases.length > 1) {
      out.push(`<polygon class="feed-split" points="${pts(f.phases)}" fill="none" stroke="${COLORS.feed}" stroke-width="1.3" stroke-dasharray="5 3"/>`);
      for (const p of f.phases) {
        const [px, py] = pixel(p);
        out.push(`<circle cx="${f1(px)}" cy="${f1(py)}" r="3" fill="white" stroke="${COLORS.feed}" stroke-width="1.3"/>`);
      }
    }
    out.push(`<path class="feed" d="M${f1(x - 5)},${f1(y)} L${f1(x)},${f1(y - 5)} L${f1(x + 5)},${f1(y)} L${f1(x)},${f1(y + 5)} Z" fill="${COLORS.feed}"/>`);
    out.push(text(x + 8, y + 14, f.label, { size: 11, color: COLORS.feed }));
  }
  if (d.cascade) out.push(...cascadeSvg(d.cascade));
  // legend
  const ly = BASE + 72;
  const legend: Array<[string, string]> = [
    [`<polyline points="0,0 24,0" stroke="${COLORS.binodal}" stroke-width="2"/>`, 'binodal curve'],
    [`<polyline points="0,0 24,0" stroke="${COLORS.tie}" stroke-width="1"/>`, 'tie-lines'],
  ];
  if (d.plaits.length) legend.push([`<circle cx="12" cy="0" r="4.5" fill="${COLORS.plait}"/>`, 'plait point']);
  if (d.triangles.length) legend.push([`<rect x="4" y="-6" width="16" height="12" fill="${COLORS.triangle}" stroke="#ff8f00"/>`, 'three-phase triangle']);
  if (d.feeds.length) legend.push([`<path d="M7,0 L12,-5 L17,0 L12,5 Z" fill="${COLORS.feed}"/>`, 'feed and its phases']);
  if (d.cascade) {
    const c = COLORS.cascade, N = d.cascade.stages.length, k = N === 1 ? '1' : `1–${N}`;
    legend.push(
      [`<polyline points="0,0 24,0" stroke="${c}" stroke-width="1.6"/>`, 'stage tie-lines'],
      [`<rect x="8.5" y="-3.5" width="7" height="7" fill="white" stroke="${c}" stroke-width="1.4"/>`, `raffinates ${k}`],
      [`<circle cx="12" cy="0" r="3.5" fill="${c}"/>`, `extracts ${k}`],
    );
  }
  let lx = 40, row = ly;
  for (const [mark, label] of legend) {
    const w = 30 + label.length * 7.4;
    if (lx > 40 && lx + w > width - 20) { lx = 40; row += 22; } // wrap to a second row
    out.push(`<g transform="translate(${lx},${row})">${mark}</g>`);
    out.push(text(lx + 30, row + 4, label, { size: 12 }));
    lx += w + 22;
  }
  const note = d.noCurve ? `No binodal curve: ${d.noCurve}` : `${d.symbol} = ${d.symbol === 'φ' ? 'volume' : 'mole'} fractions; every point from the cell functions (TBINODAL, TPLAIT, TTRIANGLE, TSPLIT${d.cascade ? ', TSTAGETABLE' : ''})`;
  out.push(text(40, row + 30, note.length > 110 ? `${note.slice(0, 107)}...` : note, { size: 10, color: '#555555' }));
  if (d.cascade) {
    const N = d.cascade.stages.length;
    out.push(text(40, row + 46, `Counter-current: feed F into stage 1, solvent S into stage ${N}; raffinate k and extract k leave stage k;`, { size: 10, color: COLORS.cascade }));
    out.push(text(40, row + 60, 'dashed: the streams passing between stages (F to extract 1, raffinate k to extract k + 1, last raffinate to S)', { size: 10, color: COLORS.cascade }));
  }
  out.push('</svg>');
  return out.join('\n');
}

/**
 * The cascade: each stage's tie-line R_k–E_k (solid), the streams passing between stages (dashed:
 * F–E_1, R_k–E_(k+1), R_N–S; in a counter-current cascade they all lie on lines through one
 * difference point), raffinates as open squares and extracts as filled circles, numbered by stage,
 * and the feed F and solvent S. A number sits beyond its point along its tie-line, away from the
 * other end.
 */
function cascadeSvg(c: NonNullable<TriangleData['cascade']>): string[] {
  const out: string[] = [], col = COLORS.cascade, st = c.stages, N = st.length;
  const passing: Array<[Composition, Composition]> = [[c.feed, st[0].extract]];
  for (let k = 0; k + 1 < N; k++) passing.push([st[k].raffinate, st[k + 1].extract]);
  passing.push([st[N - 1].raffinate, c.solvent]);
  for (const [p, q] of passing) out.push(`<polyline class="stage-passing" points="${pts([p, q])}" stroke="${col}" stroke-width="0.9" stroke-dasharray="4 3" fill="none"/>`);
  for (const s of st) out.push(`<polyline class="stage-tie" points="${pts([s.raffinate, s.extract])}" stroke="${col}" stroke-width="1.6" fill="none"/>`);
  /** A label 8 px beyond p, on the side away from q (its text centred on that line). */
  const beyond = (p: Composition, q: Composition): [number, number, string] => {
    const [px, py] = pixel(p), [qx, qy] = pixel(q);
    const len = Math.hypot(px - qx, py - qy) || 1, ux = (px - qx) / len, uy = (py - qy) / len;
    return [px + 8 * ux, py + 8 * uy + 4 + 4 * uy, ux > 0.3 ? 'start' : ux < -0.3 ? 'end' : 'middle'];
  };
  st.forEach((s, k) => {
    const [rx, ry] = pixel(s.raffinate), [ex, ey] = pixel(s.extract);
    out.push(`<rect class="stage-raffinate" x="${f1(rx - 3.5)}" y="${f1(ry - 3.5)}" width="7" height="7" fill="white" stroke="${col}" stroke-width="1.4"/>`);
    out.push(`<circle class="stage-extract" cx="${f1(ex)}" cy="${f1(ey)}" r="3.5" fill="${col}"/>`);
    const [lrx, lry, ar] = beyond(s.raffinate, s.extract), [lex, ley, ae] = beyond(s.extract, s.raffinate);
    out.push(text(lrx, lry, String(k + 1), { size: 11, anchor: ar, color: col }));
    out.push(text(lex, ley, String(k + 1), { size: 11, anchor: ae, color: col }));
  });
  // F and S beside their marks, on the side towards the middle of the triangle (above the base line on it)
  for (const [p, label] of [[c.feed, 'F'], [c.solvent, 'S']] as const) {
    const [x, y] = pixel(p), left = x > LEFT + SIDE / 2;
    out.push(`<path class="stage-stream" d="M${f1(x)},${f1(y - 5)} L${f1(x + 5)},${f1(y + 4)} L${f1(x - 5)},${f1(y + 4)} Z" fill="${col}"/>`);
    out.push(text(left ? x - 8 : x + 8, y > BASE - 6 ? y - 5 : y + 4, label, { size: 11, anchor: left ? 'end' : 'start', color: col, weight: 'bold' }));
  }
  return out;
}

/**
 * `mixgap diagram` for a three-component card: OUT.svg and OUT.png, and a summary on stdout.
 * `at` is the temperature (card unit); `feed` holds texts "x_B,x_C" or "LABEL=x_B,x_C".
 */
export async function triangleAction(
  metadata: CustomFunctionsMetadata, grid: CardGrid, where: string, opts: { at?: number; feed?: string[]; cascade?: string; rows?: number; title?: string }, base: string,
  write: (target: string, body: (tmp: string) => Promise<void>) => Promise<void>,
): Promise<void> {
  if (opts.at === undefined) throw new Error('a three-component card is drawn at one temperature: give --at T (in the card\'s temperature unit)');
  const feeds = (opts.feed ?? []).map(parseFeed);
  const cascade = opts.cascade === undefined ? undefined : parseCascade(opts.cascade);
  const data = triangleData(metadata, grid, { T: opts.at, feeds, cascade, rows: opts.rows, title: opts.title });
  const svg = triangleSvg(data);
  await write(`${base}.svg`, async (tmp) => writeFileSync(tmp, svg));
  await write(`${base}.png`, async (tmp) => writeFileSync(tmp, renderPng(svg)));
  const n = (k: number, what: string) => `${k} ${what}${k === 1 ? '' : 's'}`;
  process.stdout.write(`mixgap diagram: ${where}\n  ${data.card}\n  at ${data.T} ${data.temperatureUnit}: ${data.branches.length} binodal branch${data.branches.length === 1 ? '' : 'es'}, ${n(data.plaits.length, 'plait point')}, ${n(data.triangles.length, 'three-phase triangle')}, ${n(data.feeds.length, 'feed')}` +
    `${data.cascade ? `, a counter-current cascade of ${n(data.cascade.stages.length, 'stage')}` : ''}\n` +
    `  ${base}.svg\n  ${base}.png\n`);
}

/** Whether a card is a three-component card (drawn as a triangle). */
export const isTernaryGrid = (grid: CardGrid): boolean => isTernaryCard(grid);

/** "x_B,x_C" or "LABEL=x_B,x_C" -> a feed; anything else is an error naming the option. */
export function parseFeed(text: string): { xB: number; xC: number; label: string } {
  const eq = text.indexOf('=');
  const label = eq > 0 ? text.slice(0, eq).trim() : '';
  const parts = (eq > 0 ? text.slice(eq + 1) : text).split(',').map((s) => s.trim());
  const [xB, xC] = parts.map(Number);
  if (parts.length !== 2 || parts.some((p) => p === '') || !Number.isFinite(xB) || !Number.isFinite(xC)) {
    throw new Error(`--feed ${text}: give x_B,x_C (two numbers, e.g. --feed 0.3,0.2), optionally after a label and "=" (--feed 'feed 1=0.3,0.2')`);
  }
  if (!(xB > 0 && xC > 0 && xB + xC < 1)) throw new Error(`--feed ${text}: x_B = ${xB}, x_C = ${xC} is not inside the composition triangle (both above 0, x_B + x_C below 1)`);
  const short = (v: number) => Number(v.toPrecision(3));
  return { xB, xC, label: label ? `${label} (${short(xB)}, ${short(xC)})` : `(${short(xB)}, ${short(xC)})` };
}

const CASCADE_USAGE = "give --cascade 'feed=xB,xC; solvent=xB,xC; ratio=S/F; stages=N; solute=NAME' (ratio=... or amounts=F,S; e.g. --cascade 'feed=0.15,0; solvent=0,1; ratio=0.6; stages=3; solute=B')";

/**
 * "feed=xB,xC; solvent=xB,xC; ratio=R; stages=N; solute=NAME" (or amounts=F,S instead of ratio)
 * -> a cascade; each key once, all five given; a key or value that does not fit is an error
 * naming the option. Ranges and counts are checked here as TSTAGETABLE checks them, so that the
 * message names the option.
 */
export function parseCascade(text: string): CascadeSpec {
  const bad = (why: string) => new Error(`--cascade ${text}: ${why}; ${CASCADE_USAGE}`);
  const got = new Map<string, string>();
  for (const part of text.split(';').map((p) => p.trim()).filter((p) => p !== '')) {
    const eq = part.indexOf('=');
    if (eq <= 0) throw bad(`"${part}" is not KEY=VALUE`);
    const key = part.slice(0, eq).trim().toLowerCase(), value = part.slice(eq + 1).trim();
    if (!['feed', 'solvent', 'ratio', 'amounts', 'stages', 'solute'].includes(key)) throw bad(`unknown key "${key}"`);
    if (got.has(key)) throw bad(`"${key}" is given twice`);
    got.set(key, value);
  }
  for (const key of ['feed', 'solvent', 'stages', 'solute']) if (!got.has(key)) throw bad(`"${key}" is missing`);
  if (got.has('ratio') === got.has('amounts')) throw bad('give either ratio= or amounts=, not both or neither');
  const numbers = (key: string, count: number): number[] => {
    const parts = got.get(key)!.split(',').map((p) => p.trim());
    const v = parts.map(Number);
    if (parts.length !== count || parts.some((p) => p === '') || !v.every(Number.isFinite)) throw bad(`${key}=${got.get(key)} must be ${count === 1 ? 'a number' : `${count} numbers separated by a comma`}`);
    return v;
  };
  const point = (key: string): [number, number] => {
    const [xB, xC] = numbers(key, 2);
    if (!(xB >= 0 && xC >= 0 && xB + xC <= 1)) throw bad(`${key}: x_B = ${xB}, x_C = ${xC} is not in the composition triangle (both at least 0, x_B + x_C at most 1)`);
    return [xB, xC];
  };
  const amounts = got.has('ratio') ? numbers('ratio', 1) : numbers('amounts', 2);
  if (!amounts.every((a) => a > 0)) throw bad(`${got.has('ratio') ? 'ratio' : 'amounts'} must be positive`);
  const [stages] = numbers('stages', 1);
  if (!(Number.isInteger(stages) && stages >= 1 && stages <= 100)) throw bad(`stages=${stages} must be a whole number from 1 to 100`);
  const solute = got.get('solute')!;
  if (solute === '') throw bad('solute= is empty: give A, B, C or a component name of the card');
  return { feed: point('feed'), solvent: point('solvent'), amounts, stages, solute };
}
