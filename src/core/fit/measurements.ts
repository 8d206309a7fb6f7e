/**
 * Measurements a model can be fitted to, and their residuals (model minus measurement) in the
 * measured quantity's own units: mole (or volume) fractions for tie-lines and boundary points,
 * kelvin for cloud points and critical temperatures.
 *
 * - tie-line (T, x', x''): the gap at T nearest to the pair; residuals x'_model - x', x''_model - x''.
 * - boundary (T, x, side): one side of the gap at T ('low' = A-rich x', 'high' = B-rich x''),
 *   the gap whose boundary on that side is nearest to x; residual x_model - x.
 * - cloud point (x0, T): the temperature at which x0 lies on the binodal (the gap temperature,
 *   ../gapTemperature.ts) minus T.
 * - critical point (Tc, optionally xc): the model's critical point nearest to it; residuals
 *   Tc_model - Tc (and xc_model - xc).
 *
 * Inside a fit the model changes a little from one evaluation to the next, so the cloud points and
 * critical points are solved locally, starting from where the previous evaluation found them (a
 * secant on the binodal for a cloud point, a root in T of the minimum of the scaled curvature for a
 * critical point), instead of searching 1 K to 20000 K each time (15 ms and 85 ms); `verify` checks
 * at the end that these are the global answers (no gap holds x0 at a higher temperature; a
 * critical point the global search finds).
 */
import { continueMap, phaseMap, type Gap, type PhaseMap } from '../binodal';
import { T_SEARCH_MAX, T_SEARCH_MIN } from '../constants';
import { criticalPoints } from '../critical';
import { refineExtremum } from '../curvature';
import { fail, kelvin, MixgapError, msg } from '../errors';
import { gapTemperature } from '../gapTemperature';
import type { BinaryModel } from '../model';
import { logRatio, pointAt } from '../model';
import { brentRoot } from '../roots';

export type Measurement =
  | { kind: 'tie-line'; T: number; xLow: number; xHigh: number; sigma?: number }
  | { kind: 'boundary'; T: number; x: number; side: 'low' | 'high'; sigma?: number }
  | { kind: 'cloud point'; x0: number; T: number; sigma?: number }
  | { kind: 'critical point'; Tc: number; xc?: number; sigmaT?: number; sigmaX?: number };

/**
 * Uncertainties when none is stated: 0.01 in composition, 1 K in temperature, so that a kelvin of a
 * cloud point counts as much as a hundredth in mole fraction (the precision a turbidity reading and
 * a composition analysis typically reach; common practice, no published source). With relative
 * weights only their ratio matters.
 */
export const DEFAULT_SIGMA_X = 0.01;
export const DEFAULT_SIGMA_T = 1;

/** One residual: which measurement (index), which quantity, and its uncertainty. */
export interface ResidualRow {
  measurement: number;
  quantity: 'x\'' | 'x\'\'' | 'x' | 'T' | 'Tc' | 'xc';
  sigma: number;
}

/** Checks the measurements and lists their residual rows. */
export function residualRows(data: readonly Measurement[]): ResidualRow[] {
  if (data.length === 0) fail('input', 'no measurements to fit');
  const rows: ResidualRow[] = [];
  const fraction = (v: number, what: string, i: number) => {
    if (!(v > 0 && v < 1)) fail('range', `measurement ${i + 1}: ${what} = ${v} must lie strictly between 0 and 1`);
  };
  const temperature = (v: number, what: string, i: number) => {
    if (!(Number.isFinite(v) && v > 0)) fail('range', `measurement ${i + 1}: ${what} = ${v} must be a temperature above 0 K`);
  };
  const sigma = (v: number | undefined, dflt: number, i: number) => {
    if (v === undefined) return dflt;
    if (!(Number.isFinite(v) && v > 0)) fail('input', `measurement ${i + 1}: its uncertainty must be a number above 0 (got ${v})`);
    return v;
  };
  data.forEach((m, i) => {
    switch (m.kind) {
      case 'tie-line':
        temperature(m.T, 'T', i); fraction(m.xLow, 'x\'', i); fraction(m.xHigh, 'x\'\'', i);
        if (!(m.xLow < m.xHigh)) fail('input', `measurement ${i + 1}: x' = ${m.xLow} must be below x'' = ${m.xHigh} (the A-rich phase first)`);
        rows.push({ measurement: i, quantity: 'x\'', sigma: sigma(m.sigma, DEFAULT_SIGMA_X, i) });
        rows.push({ measurement: i, quantity: 'x\'\'', sigma: sigma(m.sigma, DEFAULT_SIGMA_X, i) });
        break;
      case 'boundary':
        temperature(m.T, 'T', i); fraction(m.x, 'x', i);
        if (m.side !== 'low' && m.side !== 'high') fail('input', `measurement ${i + 1}: side must be 'low' (A-rich) or 'high' (B-rich)`);
        rows.push({ measurement: i, quantity: 'x', sigma: sigma(m.sigma, DEFAULT_SIGMA_X, i) });
        break;
      case 'cloud point':
        temperature(m.T, 'T', i); fraction(m.x0, 'x0', i);
        rows.push({ measurement: i, quantity: 'T', sigma: sigma(m.sigma, DEFAULT_SIGMA_T, i) });
        break;
      case 'critical point':
        temperature(m.Tc, 'Tc', i);
        rows.push({ measurement: i, quantity: 'Tc', sigma: sigma(m.sigmaT, DEFAULT_SIGMA_T, i) });
        if (m.xc !== undefined) {
          fraction(m.xc, 'xc', i);
          rows.push({ measurement: i, quantity: 'xc', sigma: sigma(m.sigmaX, DEFAULT_SIGMA_X, i) });
        }
        break;
      default:
        fail('input', `measurement ${i + 1}: unknown kind "${(m as { kind: string }).kind}"`);
    }
  });
  return rows;
}

/** What the local solves remember between evaluations (per measurement). */
interface Track {
  /** Last phase map at the measurement's temperature (warm start of the next solve). */
  map?: PhaseMap;
  /** Cloud point: the last gap temperature; critical point: the last Tc. */
  T?: number;
  /** Critical point: last (Tc, u). */
  u?: number;
  /** Cloud point: slope df/dT of the last solve's bracket (see cloudTemperature). */
  slope?: number;
}

/**
 * Residuals of a list of measurements for one model after another, each solve started from the
 * previous one's answer. `evaluate` writes the weighted residuals (model - measured) / sigma.
 */
export class ResidualEvaluator {
  readonly rows: ResidualRow[];
  private tracks: Track[];
  constructor(readonly data: readonly Measurement[]) {
    this.rows = residualRows(data);
    this.tracks = data.map(() => ({}));
  }

  /** Forgets the warm starts (a model far from the last one). */
  reset(): void {
    this.tracks = this.data.map(() => ({}));
  }

  /**
   * Unweighted residuals, one per row; throws MixgapError when the model has no such feature.
   * `fresh`: tie-lines and boundary points from phase maps solved afresh, not followed.
   */
  residuals(model: BinaryModel, fresh = false): number[] {
    if (fresh) this.tracks.forEach((t) => { t.map = undefined; });
    const out: number[] = [];
    this.data.forEach((m, i) => {
      const track = this.tracks[i];
      switch (m.kind) {
        case 'tie-line': {
          const gap = nearestGap(this.mapAt(model, m.T, track), (g) => Math.abs(g.low.x - m.xLow) + Math.abs(g.high.x - m.xHigh), m.T);
          out.push(gap.low.x - m.xLow, gap.high.x - m.xHigh);
          break;
        }
        case 'boundary': {
          const gap = nearestGap(this.mapAt(model, m.T, track), (g) => Math.abs(g[m.side].x - m.x), m.T);
          out.push(gap[m.side].x - m.x);
          break;
        }
        case 'cloud point':
          out.push(cloudTemperature(model, m.x0, m.T, track) - m.T);
          break;
        case 'critical point': {
          const { T, x } = criticalNear(model, m.Tc, m.xc, track);
          out.push(T - m.Tc);
          if (m.xc !== undefined) out.push(x - m.xc);
          break;
        }
      }
    });
    return out;
  }

  /** Weighted residuals (model - measured) / sigma. */
  weighted(model: BinaryModel): number[] {
    return this.residuals(model).map((r, k) => r / this.rows[k].sigma);
  }

  /**
   * Checks that the locally tracked cloud points and critical points of `model` are the global
   * ones: the gap temperature of x0 (the highest T at which it lies on a binodal) and a critical
   * point the full search finds. Fails ('convergence') naming the measurement otherwise.
   */
  verify(model: BinaryModel): void {
    let critical: ReturnType<typeof criticalPoints> | undefined;
    const all = () => (critical ??= criticalPoints(model));
    const clouds: Array<{ i: number; x0: number; local: number }> = [];
    this.data.forEach((m, i) => {
      const track = this.tracks[i];
      if (m.kind === 'cloud point') {
        clouds.push({ i, x0: m.x0, local: cloudTemperature(model, m.x0, m.T, track) });
      } else if (m.kind === 'critical point') {
        const local = criticalNear(model, m.Tc, m.xc, track);
        if (!all().some((c) => Math.abs(c.T - local.T) <= 1e-6 * local.T && Math.abs(c.x - local.x) <= 1e-5)) {
          fail('convergence', msg`measurement ${i + 1} (critical point near ${kelvin(m.Tc)}): the fit matched a point with g'' = g''' = 0 at ${kelvin(local.T)}, x = ${local.x.toPrecision(6)}, where no gap of the fitted model closes; give starting values closer to the data`);
        }
      }
    });
    if (clouds.length === 0) return;
    // The local crossing is the gap temperature (the highest T at which x0 lies in a gap) unless x0
    // is inside a gap at a higher temperature. The temperatures gapTemperature samples (evenly in
    // ln T from the top, plus next to each critical point) are tested above each crossing, each
    // phase map once for all cloud points: the same check gapTemperature makes before it bisects.
    const lowest = Math.min(...clouds.map((c) => c.local));
    const N = 200;
    const samples: number[] = [];
    for (let k = 0; k < N; k++) samples.push(T_SEARCH_MIN * Math.pow(T_SEARCH_MAX / T_SEARCH_MIN, k / (N - 1)));
    for (const c of all()) samples.push(c.kind === 'upper' ? c.T * (1 - 1e-7) : c.T * (1 + 1e-7));
    let hint: PhaseMap | undefined;
    for (const T of samples.filter((t) => t > lowest * (1 + 1e-9)).sort((a, b) => b - a)) {
      let map: PhaseMap | undefined;
      try {
        map = phaseMap(model.at(T), hint);
        hint = map;
      } catch (e) {
        // a boundary beyond the dilute limit: the gap spans every composition resolved on that side
        if (!(e instanceof MixgapError && e.reason === 'range')) throw e;
      }
      for (const c of clouds) {
        if (!(T > c.local * (1 + 1e-9)) || (map && !map.gaps.some((g) => g.low.x < c.x0 && c.x0 < g.high.x))) continue;
        const global = gapTemperature(model, c.x0, all());
        fail('convergence', msg`measurement ${c.i + 1} (cloud point of x0 = ${c.x0}): the fit settled on a binodal crossing at ${kelvin(c.local)}, but the gap temperature of the fitted model is ${kelvin(global)}; give starting values closer to the data`);
      }
    }
  }

  private mapAt(model: BinaryModel, T: number, track: Track): PhaseMap {
    const hint = track.map && track.map.T === T ? track.map : undefined;
    const iso = model.at(T);
    // the last model's map at this T, followed to this model (continueMap: phaseMap's answer bit
    // for bit when it settles, else solved afresh); fitSystems reports its final residuals from
    // fresh phase maps
    const map = (hint && hint.gaps.length > 0 && continueMap(iso, hint)) || phaseMap(iso, hint);
    track.map = map;
    return map;
  }
}

/** The gap minimising `distance`; fails ('none') when there is no gap at T. */
function nearestGap(map: PhaseMap, distance: (g: Gap) => number, T: number): Gap {
  if (map.gaps.length === 0) fail('none', msg`the model has no miscibility gap at T = ${kelvin(T)}, where a boundary was measured`);
  return map.gaps.reduce((best, g) => (distance(g) < distance(best) ? g : best));
}

/**
 * Temperature at which x0 lies on the binodal, near `T0` (the measured cloud point, then the last
 * answer), where x0 leaves its gap on heating. A bracket is found by a secant step from the last
 * solve (below) or else by stepping T (1 %, doubling), and the root by Brent's method to a
 * relative 1e-13 (what gapTemperature reaches), each phase map warm-started from the last.
 */
function cloudTemperature(model: BinaryModel, x0: number, Tmeasured: number, track: Track): number {
  let hint: PhaseMap | undefined = track.map;
  const gapAtT = (T: number): Gap | undefined => {
    const iso = model.at(T);
    const near = hint && Math.abs(hint.T - T) < 0.1 * T ? hint : undefined;
    // continued from a nearby map with a gap (phaseMap's answer, bit for bit, when it settles; see
    // ../binodal.ts), else solved afresh; a gap it cannot see would be caught by `verify`
    const map = (near && near.gaps.length > 0 && continueMap(iso, near)) || phaseMap(iso, near);
    hint = map;
    if (map.gaps.length === 0) return undefined;
    return map.gaps.reduce((best, g) => (dist(g) < dist(best) ? g : best));
  };
  const dist = (g: Gap) => (x0 < g.low.x ? g.low.x - x0 : x0 > g.high.x ? x0 - g.high.x : 0);
  // f = distance of x0 into its gap (> 0 below the cloud point), minus the distance to the nearest
  // gap outside it, -1 with no gap at all: continuous where the binodal crosses x0 on either side
  const f = (T: number): number => {
    const g = gapAtT(T);
    if (!g) return -1;
    return g.low.x < x0 && x0 < g.high.x ? Math.min(x0 - g.low.x, g.high.x - x0) : -dist(g);
  };
  const T0 = track.T ?? Tmeasured;
  const f0 = f(T0);
  let lo = T0, hi = T0, fLo = f0, fHi = f0, bracketed = false;
  // Inside a fit the model moves little between evaluations: a secant step with the last solve's
  // slope of f, made 1.5 times as long (and at least 1e-11 T0), usually brackets the root at once,
  // and narrowly, so that Brent's method needs a few evaluations instead of a dozen.
  if (track.slope !== undefined && track.slope < 0) {
    const dT = -f0 / track.slope;
    const step = Math.sign(dT || 1) * Math.max(1.5 * Math.abs(dT), 1e-11 * T0);
    if (Math.abs(step) < 0.01 * T0) {
      const T1 = T0 + step, f1 = f(T1);
      if (f0 > 0 && f1 <= 0) { hi = T1; fHi = f1; bracketed = true; }
      else if (f0 <= 0 && f1 > 0) { lo = T1; fLo = f1; bracketed = true; }
    }
  }
  // f > 0 below the cloud point (inside the gap), <= 0 above it: step up while inside, down while outside
  for (let step = 0.01; !bracketed; step *= 2) {
    if (f0 > 0) {
      if (hi >= T_SEARCH_MAX) fail('range', msg`x0 = ${x0} is still inside a gap at ${kelvin(T_SEARCH_MAX)}`);
      lo = hi; fLo = fHi;
      hi = Math.min(T_SEARCH_MAX, T0 * (1 + step)); fHi = f(hi);
      if (fHi <= 0) break;
    } else {
      if (lo <= T_SEARCH_MIN || step > 64) fail('none', msg`x0 = ${x0} does not enter a miscibility gap of the model below ${kelvin(T0)}`);
      hi = lo; fHi = fLo;
      lo = Math.max(T_SEARCH_MIN, T0 / (1 + step)); fLo = f(lo);
      if (fLo > 0) break;
    }
  }
  const T = brentRoot(f, lo, hi, fLo, fHi, 1e-13 * hi);
  if (Number.isNaN(T)) fail('convergence', msg`the binodal crossing of x0 = ${x0} near ${kelvin(Tmeasured)} could not be bracketed`);
  track.T = T;
  track.slope = (fHi - fLo) / (hi - lo);
  track.map = hint;
  return T;
}

/**
 * The critical point near (Tc, xc): the temperature at which the local minimum of the scaled
 * curvature q = x y g''/RT nearest to u = ln(x/y) passes through zero (g'' = g''' = 0, as in
 * ../critical.ts), bracketed by stepping T (1 %, doubling) and found by Brent's method to a
 * relative 1e-13.
 */
function criticalNear(model: BinaryModel, Tc: number, xc: number | undefined, track: Track): { T: number; x: number } {
  try {
    return localCritical(model, Tc, xc, track);
  } catch (e) {
    if (!(e instanceof MixgapError)) throw e;
  }
  // The local bracket failed (the model's critical point lies far from the last one, or the
  // curvature minimum followed from u = 0 sits at a dilute end, as for a long polymer): take the
  // global search's critical point nearest to the measured one and solve locally from there.
  const all = criticalPoints(model);
  if (all.length === 0) fail('none', msg`the model has no critical point (wanted near ${kelvin(Tc)})`);
  const distance = (c: { T: number; x: number }) => Math.abs(Math.log(c.T / Tc)) + (xc === undefined ? 0 : Math.abs(c.x - xc));
  const nearest = all.reduce((best, c) => (distance(c) < distance(best) ? c : best));
  return localCritical(model, Tc, xc, { ...track, T: nearest.T, u: logRatio(nearest.x) }, track);
}

/** criticalNear from the tracked (or measured) point only; `out` receives the new track. */
function localCritical(model: BinaryModel, Tc: number, xc: number | undefined, track: Track, out: Track = track): { T: number; x: number } {
  let u = track.u ?? logRatio(xc ?? 0.5);
  const depth = (T: number) => {
    const m = refineExtremum(model.at(T), u - 0.5, u + 0.5, 1, 10, 1e-14);
    u = m.u;
    return m.q;
  };
  const T0 = track.T ?? Tc;
  const u0 = u;
  const q0 = depth(T0);
  let lo = T0, hi = T0, qLo = q0, qHi = q0;
  for (let step = 0.01; ; step *= 2) {
    if (step > 4) fail('none', msg`the model has no critical point near ${kelvin(Tc)}`);
    u = u0;
    const a = T0 / (1 + step), b = Math.min(T_SEARCH_MAX, T0 * (1 + step));
    const qa = depth(a);
    if (qa > 0 !== q0 > 0) { lo = a; qLo = qa; hi = T0; qHi = q0; break; }
    u = u0;
    const qb = depth(b);
    if (qb > 0 !== q0 > 0) { lo = T0; qLo = q0; hi = b; qHi = qb; break; }
  }
  u = u0;
  const T = brentRoot(depth, lo, hi, qLo, qHi, 1e-13 * hi);
  if (Number.isNaN(T)) fail('convergence', msg`the critical point near ${kelvin(Tc)} could not be bracketed`);
  depth(T);
  out.T = T;
  out.u = u;
  return { T, x: pointAt(u).x };
}
