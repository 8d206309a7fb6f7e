import { continueMap, phaseMap, type Gap, type PhaseMap } from './binodal';
import { criticalPoint, criticalSearch, noCriticalPoint, type CriticalPoint } from './critical';
import { BoundedCache } from './boundedCache';
import { fail, kelvin, msg } from './errors';
import { WARM_WINDOW } from './limits';
import type { BinaryModel, Isotherm } from './model';
import { pointAt } from './model';

/**
 * Shared, bounded memory of solves. Every cell function that needs the gaps at (model, T) asks
 * here, so GAPLOW and GAPHIGH of one row solve once.
 *
 * Solves live in a direct-mapped table of 4096 slots (a hash of model and T picks the slot; a new
 * solve replaces what was there), packed into one preallocated Float64Array: 1 MiB in all, fixed,
 * and no garbage however many distinct temperatures a workbook recalculates. Systems are
 * remembered by parameter text, 256 at most (least recently used first out), each with its
 * critical points. A model marked as a small move of another (`movedFrom`: UNCERTAINTY's
 * evaluations) is remembered with its model object instead, so that it pushes no system out.
 */
const SLOTS = 4096;
const SLOT_SIZE = 32; // [T, model id + 1, number of gaps, (u', u'', slope) per gap, u of each spinodal point, NaN]
const table = new Float64Array(SLOTS * SLOT_SIZE);

interface ModelState {
  id: number;
  critical?: CriticalPoint[];
  /** criticalSearch's crossings (found with the critical points). */
  crossings?: number[];
  last?: PhaseMap;
  /** The state of the model this one is a small move of (see movedFrom). */
  parent?: ModelState;
  /** For a move of a central difference (see movedFrom): the model it is followed from. */
  follows?: BinaryModel;
}
/** Each model's state by its parameter text, 256 at most (least recently used first out). */
const models = new BoundedCache<ModelState>(256);
/** The states of moved models (movedFrom), as long as their model objects live. */
let movedStates = new WeakMap<BinaryModel, ModelState>();
let nextId = 0;

function modelState(model: BinaryModel): ModelState {
  return movedStates.get(model) ?? models.get(model.key, () => ({ id: nextId++ % 2 ** 30 }));
}

/**
 * Marks `model` as `parent` with its parameters moved a little (UNCERTAINTY's evaluations, whose
 * model objects the caller keeps while they are useful): its solves start from the parent's map at
 * the same temperature, and it is remembered with its model object, apart from the 256 systems.
 * Only where work starts changes: the answers are the same bits (see equilibriumAt).
 *
 * With `step` (a central difference's move, a hundredth of a standard uncertainty: see
 * core/fit/propagation.ts), a map of one gap over one unstable interval is followed from the
 * parent's own map at T by continueMap (its spinodal points and gap by Newton's method, ending in
 * the same final solves as phaseMap's), without sampling the curvature anew: so small a move
 * opens or closes no gap except next to a critical condition, where the same UNCERTAINTY's
 * band-end evaluations (solved in full) find the result far from linear and refuse it. The
 * parent's map is computed when missing, so the path taken never depends on what ran before.
 */
export function movedFrom(model: BinaryModel, parent: BinaryModel, step = false): void {
  if (model === parent || movedStates.has(model)) return;
  movedStates.set(model, { id: nextId++ % 2 ** 30, parent: modelState(parent), follows: step ? parent : undefined });
}

const bitsOf = new Float64Array(1);
const bits = new Uint32Array(bitsOf.buffer);
function slotOf(id: number, T: number): number {
  bitsOf[0] = T;
  let h = Math.imul(bits[0] ^ Math.imul(id + 1, 0x9e3779b1), 0x85ebca6b) ^ bits[1];
  h = Math.imul(h ^ (h >>> 15), 0xc2b2ae35);
  return ((h ^ (h >>> 13)) >>> 0) % SLOTS;
}

function store(id: number, map: PhaseMap): void {
  const need = 4 + 3 * map.gaps.length + map.spinodal.length;
  if (need > SLOT_SIZE) return; // an exotic system with many gaps: solved again when asked again
  const o = slotOf(id, map.T) * SLOT_SIZE;
  table[o] = map.T;
  table[o + 1] = id + 1;
  table[o + 2] = map.gaps.length;
  let k = o + 3;
  for (const g of map.gaps) {
    table[k++] = g.low.u;
    table[k++] = g.high.u;
    table[k++] = g.slope;
  }
  for (const p of map.spinodal) table[k++] = p.u;
  table[k] = NaN; // end of the spinodal list
}

function lookup(id: number, T: number): PhaseMap | undefined {
  const o = slotOf(id, T) * SLOT_SIZE;
  if (table[o] !== T || table[o + 1] !== id + 1) return undefined;
  const gaps = [];
  let k = o + 3;
  for (let i = 0; i < table[o + 2]; i++, k += 3) gaps.push({ low: pointAt(table[k]), high: pointAt(table[k + 1]), slope: table[k + 2] });
  const spinodal = [];
  for (; !Number.isNaN(table[k]); k++) spinodal.push(pointAt(table[k]));
  return { T, gaps, spinodal };
}

/** The last parent map read back by parentMap: the moved models of one UNCERTAINTY share it. */
let lastParent: { state: ModelState; map: PhaseMap } | undefined;

/** The map of a moved model's parent at T, if remembered (read back once for all its moves at T). */
function parentMap(parent: ModelState, T: number): PhaseMap | undefined {
  if (lastParent && lastParent.state === parent && lastParent.map.T === T) return lastParent.map;
  const map = parent.last?.T === T ? parent.last : lookup(parent.id, T);
  if (map) lastParent = { state: parent, map };
  return map;
}

export function checkTemperature(T: number): void {
  if (!Number.isFinite(T)) fail('range', 'the temperature must be a finite number of kelvin');
  if (!(T > 0)) fail('range', msg`the temperature must be above ${kelvin(0)} (got ${kelvin(T)})`);
}

/**
 * Gaps and spinodal at T, solved once and remembered. The last temperature solved for the same
 * model (when within WARM_WINDOW, 10 %) gives the solve its starting points (a filled column of
 * temperatures continues from row to row); a moved model (movedFrom) starts from its parent's map
 * at T when there is one. The answer is the same bits without them (phaseMap ends every gap in
 * the same final solve), so no cell depends on what was calculated before it.
 */
export function equilibriumAt(model: BinaryModel, T: number): PhaseMap {
  checkTemperature(T);
  const state = modelState(model);
  const known = lookup(state.id, T);
  if (known) return known;
  const iso = model.at(T);
  const map = state.follows ? followed(iso, equilibriumAt(state.follows, T)) : phaseMap(iso, warmStart(state, T));
  state.last = map;
  store(state.id, map);
  return map;
}

/** A central difference's map (see movedFrom): followed from its parent's, else solved from there. */
function followed(iso: Isotherm, from: PhaseMap): PhaseMap {
  return continueMap(iso, from) ?? phaseMap(iso, from);
}

/** Where a solve at T starts: a moved model's parent's map at T, else the model's own last map within WARM_WINDOW. */
function warmStart(state: ModelState, T: number): PhaseMap | undefined {
  return (state.parent && parentMap(state.parent, T))
    ?? (state.last && Math.abs(state.last.T - T) < WARM_WINDOW * T ? state.last : undefined);
}

/** Every critical point of the model between 1 K and 20000 K, highest first; computed once. */
export function criticalPointsOf(model: BinaryModel): CriticalPoint[] {
  return searched(model).critical!;
}

/** Every temperature between 1 K and 20000 K where an unstable interval appears or vanishes (criticalSearch's crossings); computed once, with the critical points. */
export function crossingsOf(model: BinaryModel): number[] {
  return searched(model).crossings!;
}

function searched(model: BinaryModel): ModelState {
  const state = modelState(model);
  if (!state.critical) {
    const { points, crossings } = criticalSearch(model);
    state.critical = points;
    state.crossings = crossings;
  }
  return state;
}

/** The critical point numbered n (1 = highest temperature); with none, why there is none. */
export function criticalPointOf(model: BinaryModel, n = 1): CriticalPoint {
  const points = criticalPointsOf(model);
  if (points.length === 0) noCriticalPoint(model);
  return criticalPoint(points, n);
}

/** The gap numbered n (from low x, 1-based) at T. */
export function gapAt(model: BinaryModel, T: number, n = 1): Gap {
  const { gaps } = equilibriumAt(model, T);
  if (gaps.length === 0) fail('none', msg`no miscibility gap at T = ${kelvin(T)}: the solution is homogeneous at every composition`);
  if (!(Number.isInteger(n) && n >= 1 && n <= gaps.length)) {
    fail('range', msg`gap ${n} does not exist at T = ${kelvin(T)}: there ${gaps.length === 1 ? 'is 1 gap' : `are ${gaps.length} gaps`} (numbered from low x)`);
  }
  return gaps[n - 1];
}

/** The unstable interval numbered n (from low x, 1-based) at T, as [x_low, x_high]. */
export function unstableAt(model: BinaryModel, T: number, n = 1): [number, number] {
  const { spinodal } = equilibriumAt(model, T);
  const count = spinodal.length / 2;
  if (count === 0) fail('none', msg`no unstable interval at T = ${kelvin(T)}: g'' > 0 at every composition`);
  if (!(Number.isInteger(n) && n >= 1 && n <= count)) {
    fail('range', msg`unstable interval ${n} does not exist at T = ${kelvin(T)}: there ${count === 1 ? 'is 1' : `are ${count}`} (numbered from low x)`);
  }
  return [spinodal[2 * n - 2].x, spinodal[2 * n - 1].x];
}

/** Empties the memory (tests and benchmarks). */
export function forgetSolves(): void {
  table.fill(0);
  models.clear();
  movedStates = new WeakMap();
  lastParent = undefined;
}
