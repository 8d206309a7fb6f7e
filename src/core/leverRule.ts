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
