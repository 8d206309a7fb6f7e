import { phaseMap, type Gap, type PhaseMap } from './binodal';
import { criticalPoints, type CriticalPoint } from './critical';
import { fail } from './errors';
import type { BinaryModel } from './model';

/**
 * Shared, bounded memory of solves. Every cell function that needs the gaps at (model, T) asks
 * here, so GAPLOW and GAPHIGH of one row solve once. Bounds: 4096 temperatures and 256 models
 * (least recently used first out); about 2 MB at most.
 */
const MAX_MAPS = 4096;
const MAX_MODELS = 256;

const maps = new Map<string, PhaseMap>();
const models = new Map<string, { critical?: CriticalPoint[]; last?: PhaseMap }>();

function remember<V>(cache: Map<string, V>, key: string, value: V, bound: number): V {
  cache.delete(key);
  cache.set(key, value);
  if (cache.size > bound) cache.delete(cache.keys().next().value as string);
  return value;
}

function recall<V>(cache: Map<string, V>, key: string): V | undefined {
  const value = cache.get(key);
  if (value !== undefined) {
    cache.delete(key);
    cache.set(key, value);
  }
  return value;
}

function modelState(model: BinaryModel) {
  return recall(models, model.key) ?? remember(models, model.key, {}, MAX_MODELS);
}

export function checkTemperature(T: number): void {
  if (!Number.isFinite(T)) fail('range', 'the temperature must be a finite number of kelvin');
  if (!(T > 0)) fail('range', `the temperature must be above 0 K (got ${T} K)`);
}

/**
 * Gaps and spinodal at T, solved once and remembered. The last temperature solved for the same
 * model (when within 10 %) seeds the solve: a filled column of temperatures continues from row to row.
 */
export function equilibriumAt(model: BinaryModel, T: number): PhaseMap {
  checkTemperature(T);
  const key = model.key + '|' + T;
  const known = recall(maps, key);
  if (known) return known;
  const state = modelState(model);
  const hint = state.last && Math.abs(state.last.T - T) < 0.1 * T ? state.last : undefined;
  const map = phaseMap(model.at(T), hint);
  state.last = map;
  return remember(maps, key, map, MAX_MAPS);
}

/** Every critical point of the model between 1 K and 20000 K, highest first; computed once. */
export function criticalPointsOf(model: BinaryModel): CriticalPoint[] {
  const state = modelState(model);
  return (state.critical ??= criticalPoints(model));
}

/** The gap numbered n (from low x, 1-based) at T. */
export function gapAt(model: BinaryModel, T: number, n = 1): Gap {
  const { gaps } = equilibriumAt(model, T);
  if (gaps.length === 0) fail('none', `no miscibility gap at T = ${T} K: the solution is homogeneous at every composition`);
  if (!(Number.isInteger(n) && n >= 1 && n <= gaps.length)) {
    fail('range', `gap ${n} does not exist at T = ${T} K: there ${gaps.length === 1 ? 'is 1 gap' : `are ${gaps.length} gaps`} (numbered from low x)`);
  }
  return gaps[n - 1];
}

/** The unstable interval numbered n (from low x, 1-based) at T, as [x_low, x_high]. */
export function unstableAt(model: BinaryModel, T: number, n = 1): [number, number] {
  const { spinodal } = equilibriumAt(model, T);
  const count = spinodal.length / 2;
  if (count === 0) fail('none', `no unstable interval at T = ${T} K: g'' > 0 at every composition`);
  if (!(Number.isInteger(n) && n >= 1 && n <= count)) {
    fail('range', `unstable interval ${n} does not exist at T = ${T} K: there ${count === 1 ? 'is 1' : `are ${count}`} (numbered from low x)`);
  }
  return [spinodal[2 * n - 2].x, spinodal[2 * n - 1].x];
}

/** Empties the memory (tests and benchmarks). */
export function forgetSolves(): void {
  maps.clear();
  models.clear();
}
