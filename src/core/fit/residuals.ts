/**
 * How far a model's binodal lies from a measured gap boundary: the boundary the core's
 * common-tangent solver computes at T, minus the measured composition.
 */
import type { PhaseMap } from '../binodal';
import { fail, kelvin, msg } from '../errors';

/**
 * Residual x_model - x_measured of a measured boundary point on the `side` ('low': A-rich,
 * 'high': B-rich) of gap number n, or, without n, of the gap whose boundary on that side is
 * nearest to x.
 */
export function boundaryResidual(map: PhaseMap, x: number, side: 'low' | 'high', n?: number): number {
  const { gaps, T } = map;
  if (gaps.length === 0) {
    fail('none', msg`the model has no miscibility gap at T = ${kelvin(T)}, so no boundary to compare with (the measured point lies outside its dome)`);
  }
  if (n !== undefined) {
    if (!(Number.isInteger(n) && n >= 1 && n <= gaps.length)) {
      fail('range', msg`gap ${n} does not exist at T = ${kelvin(T)}: the model has ${gaps.length} (numbered from low x)`);
    }
    return gaps[n - 1][side].x - x;
  }
  let best = gaps[0][side].x - x;
  for (const gap of gaps) {
    const r = gap[side].x - x;
    if (Math.abs(r) < Math.abs(best)) best = r;
  }
  return best;
}
