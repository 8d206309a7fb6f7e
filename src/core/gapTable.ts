import { continueMap, phaseMap, type Gap, type PhaseMap } from './binodal';
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
 * the previous one; between two temperatures with no critical point in between, the spinodal and
 * the gap are followed by Newton's method alone (see continueMap).
 */
export function gapTable(model: BinaryModel, temperatures: readonly number[], n: number, critical: readonly CriticalPoint[]): GapRow[] {
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
  // the last three answers (at grid temperatures) start the next row
  let hint: PhaseMap | undefined, before: PhaseMap | undefined, beforeThat: PhaseMap | undefined;
  const criticalTs = Float64Array.from(critical, (c) => c.T);
  const criticalBetween = (a: number, b: number) => {
    for (let k = 0; k < criticalTs.length; k++) {
      const t = criticalTs[k];
      if ((t >= a && t <= b) || (t >= b && t <= a)) return true;
    }
    return false;
  };
  for (let i = 0; i < rows; i++) {
    const T = Ts[i];
    const iso = model.at(T);
    // Earlier answers are followed only across no critical point (then no gap opens or closes).
    const across = hint !== undefined && criticalBetween(hint.T, T);
    const map = (hint && !across && continueMap(iso, hint, before, beforeThat)) || phaseMap(iso, hint);
    const c = critAt[i];
    if (!c) {
      beforeThat = across ? undefined : before;
      before = across ? undefined : hint;
      hint = map;
    }
    let gaps: Gap[] = map.gaps;
    if (c) {
      // The gap closing here, exactly at its critical point (the solve may show it as a sliver).
      const p: Point = pointAt(logRatio(c.x));
      gaps = [...gaps.filter((g) => !(g.low.x <= c.x && c.x <= g.high.x)), { low: p, high: p, slope: NaN }].sort((a, b) => a.low.x - b.low.x);
    }
    const gap = gaps[n - 1];
    if (!gap) {
      table.push({ T, low: NaN, high: NaN, spinLow: NaN, spinHigh: NaN, critical: !!c });
      continue;
    }
    // the outermost spinodal points inside the gap
    let innerLow = Infinity, innerHigh = -Infinity;
    for (const s of map.spinodal) {
      if (!(s.x > gap.low.x && s.x < gap.high.x)) continue;
      if (s.x < innerLow) innerLow = s.x;
      if (s.x > innerHigh) innerHigh = s.x;
    }
    const spinLow = gap.low === gap.high ? gap.low.x : innerLow <= innerHigh ? innerLow : NaN;
    const spinHigh = gap.low === gap.high ? gap.low.x : innerLow <= innerHigh ? innerHigh : NaN;
    table.push({ T, low: gap.low.x, high: gap.high.x, spinLow, spinHigh, critical: !!c });
  }
  return table;
}
