import { phaseMap, type PhaseMap } from './binodal';
import { T_SEARCH_MAX, T_SEARCH_MIN } from './limits';
import type { CriticalPoint } from './critical';
import { fail, MixgapError, kelvin, msg } from './errors';
import type { BinaryModel } from './model';

/** Whether x0 lies strictly inside one of the gaps of a phase map. */
function inside(map: PhaseMap, x0: number): boolean {
  return map.gaps.some((g) => g.low.x < x0 && x0 < g.high.x);
}

/**
 * Gap temperature of a composition x0: the highest T (1 K to 20000 K) at which x0 lies on a
 * binodal, i.e. where it enters a gap on cooling below an upper critical point.
 * Temperatures are sampled from the top down (evenly in ln T, plus the temperatures next to each
 * critical point, where a gap is narrowest); between the highest sample inside a gap and the one
 * above it, bisection finds the boundary to a relative 1e-13.
 */
export function gapTemperature(model: BinaryModel, x0: number, critical: readonly CriticalPoint[]): number {
  if (!(x0 > 0 && x0 < 1)) fail('range', `the composition must lie strictly between 0 and 1 (got ${x0})`);
  const samples: number[] = [];
  const N = 200;
  for (let i = 0; i < N; i++) samples.push(T_SEARCH_MIN * Math.pow(T_SEARCH_MAX / T_SEARCH_MIN, i / (N - 1)));
  for (const c of critical) samples.push(c.kind === 'upper' ? c.T * (1 - 1e-7) : c.T * (1 + 1e-7));
  samples.sort((a, b) => b - a);

  let hint: PhaseMap | undefined;
  const test = (T: number) => {
    let map: PhaseMap;
    try {
      map = phaseMap(model.at(T), hint);
    } catch (e) {
      // A gap boundary beyond U_LIMIT (closer than DILUTE_LIMIT to a pure component): the gap spans
      // every composition the solvers resolve on that side, x0 among them.
      if (e instanceof MixgapError && e.reason === 'range') return true;
      throw e;
    }
    hint = map;
    return inside(map, x0);
  };
  if (test(samples[0])) fail('range', msg`x = ${x0} is still inside a gap at ${kelvin(T_SEARCH_MAX)}: its gap temperature is above the range Mixgap searches`);
  let above = samples[0];
  for (let i = 1; i < samples.length; i++) {
    const T = samples[i];
    if (T > above || T < T_SEARCH_MIN) continue;
    if (!test(T)) { above = T; continue; }
    let lo = T, hi = above; // x0 inside a gap at lo, outside at hi
    while (hi - lo > 1e-13 * hi) {
      const mid = 0.5 * (lo + hi);
      if (mid <= lo || mid >= hi) break;
      if (test(mid)) lo = mid; else hi = mid;
    }
    return 0.5 * (lo + hi);
  }
  return fail('none', msg`x = ${x0} does not enter a miscibility gap between ${kelvin(T_SEARCH_MIN)} and ${kelvin(T_SEARCH_MAX)}`);
}
