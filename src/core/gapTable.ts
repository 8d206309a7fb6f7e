import { continueMap, followable, followedMap, followTrack, phaseMap, Track, type Gap, type PhaseMap } from './binodal';
import type { CriticalPoint } from './critical';
import type { BinaryModel, Point } from './model';
import { pointAt, logRatio } from './model';

/** One row of a gap table; NaN where the gap does not exist at that temperature. */
export interface GapRow {
  T: number;
  low: number;
  high: number;
  spinLow: number;
  spinHigh: number;
  /** Whether this row is a critical point put in place of a grid temperature. */
  critical: boolean;
}

/** `rows` temperatures evenly spaced from T1 to T2 (both included). */
export function evenTemperatures(T1: number, T2: number, rows: number): number[] {
  return Array.from({ length: rows }, (_, i) => (rows === 1 ? T1 : T1 + ((T2 - T1) * i) / (rows - 1)));
}

/**
 * Temperature, binodal and spinodal compositions of gap n (numbered from low x) at the given
 * temperatures (kelvin, in order). Each critical temperature strictly inside their range replaces
 * the nearest interior temperature not already replaced (the first and last temperatures always
 * stay, so the table spans what was asked; with two rows there is no interior row and no critical
 * row), and its row holds the critical composition in all four columns, so a chart of the table
 * closes its dome at the critical point. The spinodal columns
 * give the outermost spinodal points inside the gap. Each temperature starts from the answer of
 * the previous one; between two temperatures with no crossing in between (`crossings`: where an
 * unstable interval appears or vanishes, criticalSearch's, which include the critical points'
 * temperatures; by default those alone), the spinodal and the gap are followed by Newton's method
 * alone (followTrack, as continueMap does, on the points of the last three rows kept as numbers:
 * no map is built for such a row), each ending in phaseMap's final solve, and refused where a
 * stable island opens inside the unstable interval (stableIslandBetween); so every row is
 * phaseMap's answer at its temperature, bit for bit.
 */
export function gapTable(
  model: BinaryModel, temperatures: readonly number[], n: number, critical: readonly CriticalPoint[],
  crossings: readonly number[] = critical.map((c) => c.T),
): GapRow[] {
  const Ts = temperatures.slice();
  const rows = Ts.length;
  const T1 = Ts[0], T2 = Ts[rows - 1];
  // the critical point replacing row i, if any (an array: read on every row)
  const critAt: Array<CriticalPoint | undefined> = new Array(rows).fill(undefined);
  const [tMin, tMax] = T1 < T2 ? [T1, T2] : [T2, T1];
  for (const c of critical) {
    if (!(c.T > tMin && c.T < tMax) || rows < 3) continue;
    let best = -1;
    for (let i = 1; i < rows - 1; i++) {
      if (critAt[i]) continue;
      if (best < 0 || Math.abs(Ts[i] - c.T) < Math.abs(Ts[best] - c.T)) best = i;
    }
    if (best >= 0) {
      critAt[best] = c;
      Ts[best] = c.T;
    }
  }
  const table: GapRow[] = [];
  // The last grid row's map, when it was solved as one, and, while the maps are one gap over one
  // unstable interval, the track of their points at the last three grid temperatures (newest
  // first), which the next row follows (followTrack) without building a map.
  let last: PhaseMap | undefined;
  let lastT = NaN;
  const track = new Track();
  // rows are not followed across a temperature where an unstable interval appears or vanishes
  const crossingTs = Float64Array.from(crossings);
  const crossingBetween = (a: number, b: number) => {
    for (let k = 0; k < crossingTs.length; k++) {
      const t = crossingTs[k];
      if ((t >= a && t <= b) || (t >= b && t <= a)) return true;
    }
    return false;
  };
  for (let i = 0; i < rows; i++) {
    const T = Ts[i];
    const iso = model.at(T);
    const c = critAt[i];
    // Earlier answers are followed only across no crossing (then no unstable interval appears or
    // vanishes, and no gap opens or closes).
    const across = lastT === lastT && crossingBetween(lastT, T);
    const followed = !c && !across && track.length > 0 ? followTrack(iso, track) : undefined;
    if (followed === 'gap') {
      const { x, next } = track;
      table.push(n === 1 ? row(T, x[2], x[3], x, 2, false) : noGap(T, false));
      track.add(T, next[0], next[1], next[2], next[3]);
      last = undefined;
      lastT = T;
      continue;
    }
    // A map: followed next to a critical point, else solved by phaseMap (not by continueMap when
    // followTrack failed: it would fail the same way), the earlier answer only a start.
    const hint = last ?? (track.length > 0 ? track.newest() : undefined);
    const map = followed ? followedMap(iso, track, followed)
      : (hint && !across && !c && track.length === 0 && continueMap(iso, hint)) || phaseMap(iso, hint);
    if (!c) {
      if (across || !followable(map)) track.clear();
      if (followable(map)) track.addMap(map);
      last = map;
      lastT = T;
    }
    let gaps: Gap[] = map.gaps;
    if (c) {
      // The gap closing here, exactly at its critical point (the solve may show it as a sliver).
      const p: Point = pointAt(logRatio(c.x));
      gaps = [...gaps.filter((g) => !(g.low.x <= c.x && c.x <= g.high.x)), { low: p, high: p, slope: NaN }].sort((a, b) => a.low.x - b.low.x);
    }
    const gap = gaps[n - 1];
    if (!gap) {
      table.push(noGap(T, !!c));
      continue;
    }
    if (gap.low === gap.high) {
      table.push({ T, low: gap.low.x, high: gap.low.x, spinLow: gap.low.x, spinHigh: gap.low.x, critical: !!c });
      continue;
    }
    const count = map.spinodal.length;
    const xs = count <= spinodalX.length ? spinodalX : new Float64Array(count);
    for (let k = 0; k < count; k++) xs[k] = map.spinodal[k].x;
    table.push(row(T, gap.low.x, gap.high.x, xs, count, !!c));
  }
  return table;
}

/** Scratch for the x of a map's spinodal points (row). */
const spinodalX = new Float64Array(16);

/** A row with no gap n. */
function noGap(T: number, critical: boolean): GapRow {
  return { T, low: NaN, high: NaN, spinLow: NaN, spinHigh: NaN, critical };
}

/** The row of a gap [low, high] (x), with the outermost spinodal points inside it among spinodalX[0..count). */
function row(T: number, low: number, high: number, spinodalX: Float64Array, count: number, critical: boolean): GapRow {
  let innerLow = Infinity, innerHigh = -Infinity;
  for (let k = 0; k < count; k++) {
    const s = spinodalX[k];
    if (!(s > low && s < high)) continue;
    if (s < innerLow) innerLow = s;
    if (s > innerHigh) innerHigh = s;
  }
  const inside = innerLow <= innerHigh;
  return { T, low, high, spinLow: inside ? innerLow : NaN, spinHigh: inside ? innerHigh : NaN, critical };
}
