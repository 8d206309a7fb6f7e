/**
 * Equilibrium extraction stages. A stage mixes a feed stream (amount F, composition z_F) with a
 * solvent stream (S, z_S); the mixture M = F + S, z_M = (F z_F + S z_S) / M, splits at T into two
 * liquid phases (./split.ts), the extract E (the phase richer in the solvent stream's main
 * component) and the raffinate R, with E + R = M and E x_E + R x_R = M z_M (lever rule).
 * Cross-current extraction: the raffinate of each stage meets fresh solvent in the next.
 * Amounts are in moles (moles of lattice sites for Flory–Huggins, whose fractions are volume
 * fractions); any consistent unit works, as only ratios enter.
 */
import { fail, kelvin, msg } from '../errors';
import { checkComposition, type TernaryModel } from './model';
import { splitFeed, type TernaryPoint } from './split';

export interface Stream {
  amount: number;
  x: TernaryPoint;
}

export interface StageResult {
  /** The mixture that splits. */
  mixture: Stream;
  extract: Stream;
  raffinate: Stream;
}

/** A stream may lack components (a pure solvent, a feed without solvent): fractions in [0, 1]. */
function checkStream(s: Stream, what: string): void {
  if (!(Number.isFinite(s.amount) && s.amount > 0)) fail('range', `the amount of the ${what} must be a positive number (got ${s.amount})`);
  const { xA, xB, xC } = s.x;
  for (const [name, v] of [['A', xA], ['B', xB], ['C', xC]] as const) {
    if (!(v >= 0 && v <= 1)) fail('range', `the ${what}: x_${name} = ${v} must lie between 0 and 1`);
  }
  if (!(Math.abs(xA + xB + xC - 1) <= 1e-9)) fail('range', `the ${what}: the fractions sum to ${xA + xB + xC}, not 1`);
}

/** The main component of a composition: 0, 1, 2 for A, B, C. */
function main(x: TernaryPoint): 0 | 1 | 2 {
  return x.xA >= x.xB && x.xA >= x.xC ? 0 : x.xB >= x.xC ? 1 : 2;
}

const part = (x: TernaryPoint, i: 0 | 1 | 2) => (i === 0 ? x.xA : i === 1 ? x.xB : x.xC);

/** One equilibrium stage at T. Fails with 'none' when the mixture is one phase or three. */
export function extractionStage(model: TernaryModel, T: number, feed: Stream, solvent: Stream): StageResult {
  checkStream(feed, 'feed');
  checkStream(solvent, 'solvent');
  const M = feed.amount + solvent.amount, f = feed.amount / M, s = solvent.amount / M;
  const z = {
    xA: f * feed.x.xA + s * solvent.x.xA,
    xB: f * feed.x.xB + s * solvent.x.xB,
    xC: f * feed.x.xC + s * solvent.x.xC,
  };
  for (const [name, v] of [['A', z.xA], ['B', z.xB], ['C', z.xC]] as const) {
    if (!(v > 0)) fail('range', `feed and solvent together hold no ${name}: the mixture lies on an edge of the triangle (use the binary functions for that pair)`);
  }
  checkComposition(z.xA, z.xB, z.xC, 'the mixture of feed and solvent');
  const r = splitFeed(model, T, z.xA, z.xB, z.xC);
  if (r.phases.length === 1) fail('none', msg`feed and solvent mix to one liquid phase at T = ${kelvin(T)}: no extraction at this solvent ratio`);
  if (r.phases.length === 3) fail('none', msg`feed and solvent form three liquid phases at T = ${kelvin(T)}: a single extract and raffinate are not defined`);
  const k = main(solvent.x);
  const e = part(r.phases[1], k) > part(r.phases[0], k) ? 1 : 0;
  return {
    mixture: { amount: M, x: z },
    extract: { amount: M * r.fractions[e], x: r.phases[e] },
    raffinate: { amount: M * r.fractions[1 - e], x: r.phases[1 - e] },
  };
}

/**
 * Cross-current extraction: stage k mixes the raffinate of stage k - 1 (the feed for k = 1) with
 * fresh solvent of amount solventAmounts[k]; one result per stage.
 */
export function crossCurrent(model: TernaryModel, T: number, feed: Stream, solventX: TernaryPoint, solventAmounts: readonly number[]): StageResult[] {
  if (solventAmounts.length === 0) fail('range', 'cross-current extraction needs at least one stage (one solvent amount)');
  const out: StageResult[] = [];
  let current = feed;
  for (const amount of solventAmounts) {
    const stage = extractionStage(model, T, current, { amount, x: solventX });
    out.push(stage);
    current = stage.raffinate;
  }
  return out;
}

export interface CounterCurrentResult {
  /** Stage n (1-based order): mixes the raffinate of stage n - 1 (the feed at n = 1) with the extract of stage n + 1 (the solvent at n = N). */
  stages: StageResult[];
  /** The extract leaving stage 1 and the raffinate leaving stage N. */
  extract: Stream;
  raffinate: Stream;
}

const MAX_SWEEPS = 500;

/**
 * Counter-current extraction with N equilibrium stages: feed enters stage 1, solvent stage N;
 * raffinates flow 1 -> N, extracts N -> 1. Solved by successive substitution: every stage starts
 * with the fresh solvent as the extract arriving from its right, sweeps run from stage 1 to N with
 * the newest raffinates and the last sweep's extracts, until no amount or fraction changes by more
 * than 1e-12 of itself (else 'convergence').
 */
export function counterCurrent(model: TernaryModel, T: number, feed: Stream, solvent: Stream, N: number): CounterCurrentResult {
  if (!(Number.isInteger(N) && N >= 1 && N <= 100)) fail('range', `the number of stages must be a whole number from 1 to 100 (got ${N})`);
  checkStream(feed, 'feed');
  checkStream(solvent, 'solvent');
  // extractIn[n] = the extract entering stage n (from stage n + 1); the last is the solvent
  const extractIn: Stream[] = Array.from({ length: N }, () => solvent);
  let stages: StageResult[] = [];
  for (let sweep = 0; sweep < MAX_SWEEPS; sweep++) {
    const next: StageResult[] = [];
    let current = feed;
    for (let n = 0; n < N; n++) {
      const st = extractionStage(model, T, current, extractIn[n]);
      next.push(st);
      current = st.raffinate;
    }
    let change = 0;
    if (stages.length === N) {
      for (let n = 0; n < N; n++) {
        for (const [a, b] of [[next[n].extract, stages[n].extract], [next[n].raffinate, stages[n].raffinate]] as const) {
          change = Math.max(change, Math.abs(a.amount - b.amount) / b.amount);
          for (const key of ['xA', 'xB', 'xC'] as const) change = Math.max(change, Math.abs(a.x[key] - b.x[key]) / b.x[key]);
        }
      }
    }
    stages = next;
    for (let n = 0; n < N - 1; n++) extractIn[n] = stages[n + 1].extract;
    if (sweep > 0 && change <= 1e-12) return { stages, extract: stages[0].extract, raffinate: stages[N - 1].raffinate };
  }
  fail('convergence', msg`counter-current extraction with ${N} stages at T = ${kelvin(T)} did not settle in ${MAX_SWEEPS} sweeps`);
}
