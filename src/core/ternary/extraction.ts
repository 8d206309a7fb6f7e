/**
 * Equilibrium extraction stages. A stage mixes a feed stream (amount F, composition z_F) with a
 * solvent stream (S, z_S); the mixture M = F + S, z_M = (F z_F + S z_S) / M, splits at T into two
 * liquid phases (./split.ts), the extract E (the phase richer in the solvent stream's main
 * component) and the raffinate R, with E + R = M and E x_E + R x_R = M z_M (lever rule).
 * Cross-current extraction: the raffinate of each stage meets fresh solvent in the next.
 * Amounts are in moles (moles of lattice sites for Flory–Huggins, whose fractions are volume
 * fractions); any consistent unit works, as only ratios enter.
 */
import { fail, kelvin, MixgapError, msg } from '../errors';
import { checkComposition, type TernaryModel } from './model';
import { solveInPlace } from './linear';
import { splitFeed, splitFrom, type TernaryPoint, type TernarySplit } from './split';

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
  const mixture = mix(feed, solvent);
  return assign(mixture, splitFeed(model, T, mixture.x.xA, mixture.x.xB, mixture.x.xC), T, solvent.x);
}

/** The mixture of two streams: M = F + S, z_M = (F z_F + S z_S) / M; it must hold all three components. */
function mix(feed: Stream, solvent: Stream): Stream {
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
  return { amount: M, x: z };
}

/** Extract (richer in the solvent's main component) and raffinate of a two-phase split of the mixture. */
function assign(mixture: Stream, r: TernarySplit, T: number, solventX: TernaryPoint): StageResult {
  if (r.phases.length === 1) fail('none', msg`feed and solvent mix to one liquid phase at T = ${kelvin(T)}: no extraction at this solvent ratio`);
  if (r.phases.length === 3) fail('none', msg`feed and solvent form three liquid phases at T = ${kelvin(T)}: a single extract and raffinate are not defined`);
  const k = main(solventX);
  const e = part(r.phases[1], k) > part(r.phases[0], k) ? 1 : 0;
  const M = mixture.amount;
  return {
    mixture,
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
  /** Newton steps the solve took, the final checked pass included (1 for one stage). */
  sweeps: number;
}

/** Most Newton steps one counter-current solve may take. */
const MAX_STEPS = 80;
/**
 * The solve stops when, for every component, the streams the unknowns assume differ from the
 * streams the stages give by at most this fraction of the component's inflow (summed over all
 * streams). The cascade's balances then close to this plus rounding (about 1e-16 per stage):
 * 1e-13 leaves room under the promised 1e-12 and stays above the noise of the splits (~1e-16).
 */
export const CASCADE_TOL = 1e-13;
/** Relative step of the finite differences of a stage's extract (one-sided: their error ~1e-7 only slows Newton's last step). */
const DIFF_STEP = 1e-7;

/**
 * Counter-current extraction with N equilibrium stages: feed F enters stage 1, solvent S stage N;
 * raffinates flow 1 -> N, extracts N -> 1. The unknowns are the component flows (moles of A, B,
 * C) of the extract E_k and the raffinate R_k leaving each stage k; stage k splits the mixture
 * m_k = R_{k-1} + E_{k+1} (R_0 = F, E_{N+1} = S), and the cascade is the root of
 *   E_k - phi(m_k) = 0,  R_k - (m_k - phi(m_k)) = 0,   k = 1 ... N,
 * phi(m) the extract of the split of m (./split.ts). Newton's method: the 3 x 3 derivative of each
 * phi by one-sided differences (three extra splits per stage), the 6N x 6N system solved by
 * Gaussian elimination with partial pivoting. A flow falls by at most a factor 1e-4 per step
 * (never to 0 or below, yet a solute flow can fall by decades in a few steps); the step is
 * halved until the residual falls. The derivatives are kept (chord steps) while the residual
 * falls a hundredfold per step. Each split starts from that stage's last tie-line (at first the
 * single stage's; Newton only, `splitFrom`), else from the stage before it in the same sweep, from scratch (`splitFeed`) where both fail. Converged (residual per component at most CASCADE_TOL of its inflow), the last
 * point is split again with every tie-line checked against the tangent plane; a stage that fails
 * is solved from scratch and the iteration goes on. First guess: every stage the single stage fed
 * with all the feed and solvent. Fails with 'none' when that stage, or a stage at the first guess,
 * is one phase (or three), with 'convergence' when no step lowers the residual or after MAX_STEPS.
 */
export function counterCurrent(model: TernaryModel, T: number, feed: Stream, solvent: Stream, N: number): CounterCurrentResult {
  if (!(Number.isInteger(N) && N >= 1 && N <= 100)) fail('range', `the number of stages must be a whole number from 1 to 100 (got ${N})`);
  checkStream(feed, 'feed');
  checkStream(solvent, 'solvent');
  const one = extractionStage(model, T, feed, solvent);
  if (N === 1) return { stages: [one], extract: one.extract, raffinate: one.raffinate, sweeps: 1 };
  const n = 6 * N;
  const flowsOf = (s: Stream) => [s.amount * s.x.xA, s.amount * s.x.xB, s.amount * s.x.xC];
  const F = flowsOf(feed), S = flowsOf(solvent);
  const scale = [0, 1, 2].map((c) => F[c] + S[c]);
  // unknowns: stage k at 6k: E_k (3), R_k (3)
  let X: Float64Array = new Float64Array(n);
  const e1 = flowsOf(one.extract), r1 = flowsOf(one.raffinate);
  for (let k = 0; k < N; k++) { X.set(e1, 6 * k); X.set(r1, 6 * k + 3); }

  // every split starts from the single stage's tie-line until it has one of its own
  const warm: Array<StageResult | undefined> = Array(N).fill(one);
  /** The split of the mixture with flows m, warm from `from`, else from `other` (the stage before it in this sweep). */
  const stageOf = (m: ArrayLike<number>, from: StageResult | undefined, verify: boolean, other?: StageResult): StageResult => {
    const amount = m[0] + m[1] + m[2];
    const x = { xA: m[0] / amount, xB: m[1] / amount, xC: m[2] / amount };
    checkComposition(x.xA, x.xB, x.xC, 'a stage mixture');
    let r = from ? splitFrom(model, T, x, [from.raffinate.x, from.extract.x], verify) : undefined;
    if (!r && other && other !== from) r = splitFrom(model, T, x, [other.raffinate.x, other.extract.x], verify);
    r ??= splitFeed(model, T, x.xA, x.xB, x.xC);
    return assign({ amount, x }, r, T, solvent.x);
  };
  const m = new Float64Array(3);
  const mixOf = (W: Float64Array, k: number) => {
    for (let c = 0; c < 3; c++) m[c] = (k > 0 ? W[6 * (k - 1) + 3 + c] : F[c]) + (k + 1 < N ? W[6 * (k + 1) + c] : S[c]);
  };
  /** Stages, residuals and the error (per component, relative to its inflow) at W. */
  const evaluate = (W: Float64Array, verify: boolean) => {
    const stages: StageResult[] = [], r = new Float64Array(n), err = [0, 0, 0];
    for (let k = 0; k < N; k++) {
      mixOf(W, k);
      const st = stageOf(m, warm[k] ?? stages[k - 1], verify, stages[k - 1]);
      stages.push(st);
      const e = flowsOf(st.extract), ra = flowsOf(st.raffinate);
      for (let c = 0; c < 3; c++) {
        r[6 * k + c] = W[6 * k + c] - e[c];
        r[6 * k + 3 + c] = W[6 * k + 3 + c] - ra[c];
        err[c] += (Math.abs(r[6 * k + c]) + Math.abs(r[6 * k + 3 + c])) / scale[c];
      }
    }
    return { stages, r, err: Math.max(...err) };
  };
  const remember = (stages: StageResult[]) => stages.forEach((st, k) => { warm[k] = st; });

  let cur = evaluate(X, false);
  remember(cur.stages);
  const D = new Float64Array(9 * N);
  let fresh = false, verify = false;
  for (let step = 1; step <= MAX_STEPS; step++) {
    if (cur.err <= CASCADE_TOL) {
      if (verify) return { stages: cur.stages, extract: cur.stages[0].extract, raffinate: cur.stages[N - 1].raffinate, sweeps: step };
      verify = true; // the same point once more, each tie-line checked against the tangent plane
      cur = evaluate(X, true);
      remember(cur.stages);
      continue;
    }
    verify = false;
    const computed = !fresh;
    if (!fresh) {
      // D_k = d phi / d m at m_k, column c from m_k + h e_c
      for (let k = 0; k < N; k++) {
        mixOf(X, k);
        const base = flowsOf(cur.stages[k].extract), h = DIFF_STEP * (m[0] + m[1] + m[2]);
        const m0 = [m[0], m[1], m[2]];
        for (let c = 0; c < 3; c++) {
          const mp = m0.slice();
          mp[c] += h;
          const e = flowsOf(stageOf(mp, cur.stages[k], false).extract);
          for (let i = 0; i < 3; i++) D[9 * k + 3 * i + c] = (e[i] - base[i]) / h;
        }
      }
      fresh = true;
    }
    // d(E_k - phi)/d(R_{k-1}, E_{k+1}) = -D_k; d(R_k - m_k + phi)/d(R_{k-1}, E_{k+1}) = -(I - D_k)
    const J = new Float64Array(n * n), delta = new Float64Array(n);
    for (let k = 0; k < N; k++) {
      for (let i = 0; i < 6; i++) {
        const row = (6 * k + i) * n;
        J[row + 6 * k + i] = 1;
        delta[6 * k + i] = -cur.r[6 * k + i];
        for (let c = 0; c < 3; c++) {
          const d = i < 3 ? -D[9 * k + 3 * i + c] : -((i - 3 === c ? 1 : 0) - D[9 * k + 3 * (i - 3) + c]);
          if (k > 0) J[row + 6 * (k - 1) + 3 + c] += d;
          if (k + 1 < N) J[row + 6 * (k + 1) + c] += d;
        }
      }
    }
    if (!solveInPlace(J, delta, n)) fail('convergence', msg`counter-current extraction with ${N} stages at T = ${kelvin(T)}: the stage equations became singular`);
    // halve the step until the residual falls (a step that leaves the two-phase region counts as a rise)
    let t = 1, next: ReturnType<typeof evaluate> | undefined, Xnext = X;
    for (let tries = 0; tries < 30; tries++, t /= 2) {
      Xnext = new Float64Array(n);
      for (let i = 0; i < n; i++) Xnext[i] = Math.max(X[i] + t * delta[i], 1e-4 * X[i]);
      try {
        const trial = evaluate(Xnext, false);
        if (trial.err < cur.err) { next = trial; break; }
      } catch (e) {
        if (!(e instanceof MixgapError && e.reason !== 'input')) throw e;
      }
    }
    if (!next) {
      if (!computed) { fresh = false; continue; } // stale derivatives: compute them anew
      fail('convergence', msg`counter-current extraction with ${N} stages at T = ${kelvin(T)}: no Newton step lowers the stage residuals`);
    }
    // keep the derivatives while they work (a hundredfold fall per full step)
    fresh = t === 1 && next.err < 0.01 * cur.err;
    X = Xnext;
    cur = next;
    remember(cur.stages);
  }
  fail('convergence', msg`counter-current extraction with ${N} stages at T = ${kelvin(T)} did not converge in ${MAX_STEPS} Newton steps`);
}

const COMPONENT = ['A', 'B', 'C'] as const;

/**
 * The solute recovery of a cascade: moles of the solute (component 0, 1, 2 = A, B, C) in the
 * final extract per mole of it in the feed. Fails with 'range' when the feed holds no solute.
 */
export function recovery(feed: Stream, extract: Stream, solute: 0 | 1 | 2): number {
  const fed = feed.amount * part(feed.x, solute);
  if (!(fed > 0)) fail('range', `the feed holds no ${COMPONENT[solute]}: there is no solute to recover`);
  return (extract.amount * part(extract.x, solute)) / fed;
}

export interface CascadeResult extends CounterCurrentResult {
  /** Moles of the solute in the final extract per mole in the feed. */
  recovery: number;
}

/** A counter-current cascade of N stages and its solute recovery. */
export function cascade(model: TernaryModel, T: number, feed: Stream, solvent: Stream, N: number, solute: 0 | 1 | 2): CascadeResult {
  checkStream(feed, 'feed');
  if (!(part(feed.x, solute) > 0)) fail('range', `the feed holds no ${COMPONENT[solute]}: there is no solute to recover`);
  const cc = counterCurrent(model, T, feed, solvent, N);
  return { ...cc, recovery: recovery(feed, cc.extract, solute) };
}

/** Most stages the inverse (stagesFor) tries. */
export const MAX_STAGES = 50;

/**
 * The number of equilibrium stages a counter-current cascade needs for a target solute recovery,
 * as a real number. Cascades of N = 1, 2, ... stages are solved until the recovery r_N reaches
 * the target; between whole counts the unrecovered share 1 - r is interpolated geometrically
 * (linearly in ln(1 - r), with r_0 = 0 for no stage):
 *   N* = (N - 1) + ln((1 - r_{N-1}) / (1 - target)) / ln((1 - r_{N-1}) / (1 - r_N)),
 * exact for a Kremser cascade at large N, where 1 - r_N falls by the extraction factor per stage.
 * At a whole count's own recovery it gives that count. Fails with 'none', naming the recovery
 * reached, when maxStages stages fall short, or the recovery stops rising or levels off below the
 * target (a pinch: the gains per stage fall geometrically and twice what they can still add falls
 * short; more stages do not help at this solvent ratio); 'range' for a target outside (0, 1).
 */
export function stagesFor(model: TernaryModel, T: number, feed: Stream, solvent: Stream, solute: 0 | 1 | 2, target: number, maxStages = MAX_STAGES): { stages: number; recoveries: number[] } {
  if (!(target > 0 && target < 1)) fail('range', `the target recovery must lie strictly between 0 and 1 (got ${target})`);
  if (!(Number.isInteger(maxStages) && maxStages >= 1 && maxStages <= 100)) fail('range', `the most stages to try must be a whole number from 1 to 100 (got ${maxStages})`);
  const recoveries = [0];
  for (let N = 1; N <= maxStages; N++) {
    const r = cascade(model, T, feed, solvent, N, solute).recovery;
    recoveries.push(r);
    const before = recoveries[N - 1];
    if (r >= target) {
      const stages = r === target ? N : N - 1 + Math.log((1 - before) / (1 - target)) / Math.log((1 - before) / (1 - r));
      return { stages, recoveries };
    }
    if (N > 1 && !(r - before > 1e-12)) {
      fail('none', msg`the cascade cannot reach a recovery of ${target}: it reaches ${r} with ${N} stages and more stages no longer raise it (a pinch at this solvent ratio and T = ${kelvin(T)}): use more solvent`);
    }
    // a pinch: the gains per stage fall geometrically (ratio q, steady to 5 %), so the recovery
    // levels off near r + gain q / (1 - q); stop when twice the gain still to come falls short
    if (N >= 4) {
      const gain = r - before, q = gain / (before - recoveries[N - 2]), q0 = (before - recoveries[N - 2]) / (recoveries[N - 2] - recoveries[N - 3]);
      const rest = (gain * q) / (1 - q);
      if (q > 0 && q < 0.95 && Math.abs(q - q0) < 0.05 * q && r + 2 * rest < target) {
        fail('none', msg`the cascade cannot reach a recovery of ${target}: it reaches ${r} with ${N} stages and levels off near ${r + rest} (a pinch at this solvent ratio and T = ${kelvin(T)}): use more solvent`);
      }
    }
  }
  fail('none', msg`the cascade cannot reach a recovery of ${target} with up to ${maxStages} stages: it reaches ${recoveries[maxStages]} (at T = ${kelvin(T)}): use more solvent or allow more stages`);
}
