import type { Gap } from './binodal';

/**
 * Lever rule: inside a gap (x', x'') an overall composition x0 splits into the B-rich phase with
 * fraction f'' = (x0 - x') / (x'' - x') and the A-rich phase with 1 - f''. Outside the gap the
 * material is one phase: f'' is 0 below x' and 1 above x''.
 */
export function leverFractions(x0: number, gap: Gap): { low: number; high: number } {
  const high = Math.min(1, Math.max(0, (x0 - gap.low.x) / (gap.high.x - gap.low.x)));
  return { low: 1 - high, high };
}

/**
 * Phase fractions of an overall composition x0 at a temperature with these gaps (sorted by x,
 * possibly none). Inside a gap: the lever rule. Outside every gap the material is one phase,
 * named after the nearest gap: "low" (A-rich) when x0 lies below it, "high" above it; with no
 * gap at all, "low" for x0 up to 1/2 and "high" above.
 */
export function phaseFractions(x0: number, gaps: readonly Gap[]): { low: number; high: number } {
  const containing = gaps.find((g) => g.low.x <= x0 && x0 <= g.high.x);
  if (containing) return leverFractions(x0, containing);
  let high: number;
  if (gaps.length === 0) high = x0 <= 0.5 ? 0 : 1;
  else {
    const distance = (g: Gap) => (x0 < g.low.x ? g.low.x - x0 : x0 - g.high.x);
    const nearest = gaps.reduce((a, b) => (distance(b) < distance(a) ? b : a));
    high = x0 < nearest.low.x ? 0 : 1;
  }
  return { low: 1 - high, high };
}
