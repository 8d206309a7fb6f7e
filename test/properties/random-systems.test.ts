/**
 * Issue 6, "never a silently wrong number": thousands of random systems of the three model families
 * (Redlich–Kister with up to four terms and temperature slopes, Flory–Huggins with chain lengths 1 to
 * 1e4 and chi = A + B/T, NRTL with tau_ij = a_ij + b_ij/T), drawn by fast-check from named seeds.
 *
 * Every number a cell function or the core returns is checked against the definitions of
 * ../../../shared/spec/thermodynamics.md, evaluated here independently of src/: g is written out from
 * the spec and its composition derivatives come from forward-mode automatic differentiation of that
 * formula (truncated Taylor arithmetic, `Jet` below), never from the core's hand-derived derivatives.
 * Whatever the solver cannot answer must come back as an error (MixgapError in the core, CellFailure
 * from a cell function), never as a number: errors are counted, printed and bounded (a floor of
 * answers per family, and the reasons an error may have), so a solver that gives up cannot pass.
 *
 * Counts printed at the end (console.info): systems tried per family, temperatures solved, errors.
 */
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { phaseMap, type Gap, type PhaseMap } from '../../src/core/binodal';
import { MixgapError } from '../../src/core/errors';
import { equilibriumAt } from '../../src/core/equilibrium';
import type { BinaryModel } from '../../src/core/model';
import { floryHuggins } from '../../src/core/models/floryHuggins';
import { nrtl } from '../../src/core/models/nrtl';
import { redlichKister } from '../../src/core/models/redlichKister';
import { CellFailure } from '../../src/functions/errors';
import * as cells from '../../src/functions/functions';

/** R from the spec: CODATA 2018, exact by the 2019 SI definitions. */
const R = 8.314462618;
const EPS = Number.EPSILON;

// ---------------------------------------------------------------------------------------------
// The spec's g, independently
// ---------------------------------------------------------------------------------------------

/** A value and its first three derivatives with respect to x (forward-mode differentiation). */
type Jet = [number, number, number, number];
const cst = (v: number): Jet => [v, 0, 0, 0];
const add = (a: Jet, b: Jet): Jet => [a[0] + b[0], a[1] + b[1], a[2] + b[2], a[3] + b[3]];
const times = (a: Jet, k: number): Jet => [a[0] * k, a[1] * k, a[2] * k, a[3] * k];
/** Leibniz's rule up to the third derivative. */
const mul = (a: Jet, b: Jet): Jet => [
  a[0] * b[0],
  a[1] * b[0] + a[0] * b[1],
  a[2] * b[0] + 2 * a[1] * b[1] + a[0] * b[2],
  a[3] * b[0] + 3 * a[2] * b[1] + 3 * a[1] * b[2] + a[0] * b[3],
];
/** 1/f: (1/f)' = -f'/f^2, (1/f)'' = (2f'^2/f - f'')/f^2, (1/f)''' = (-f''' + 6f'f''/f - 6f'^3/f^2)/f^2. */
const recip = (a: Jet): Jet => {
  const r = 1 / a[0], r2 = r * r;
  return [r, -a[1] * r2, (2 * a[1] * a[1] * r - a[2]) * r2, (-a[3] + 6 * a[1] * a[2] * r - 6 * a[1] ** 3 * r2) * r2];
};

/** One system of one family, with the parameters both as the core takes them and as a cell takes them. */
interface RandomSystem {
  family: 'RK' | 'FH' | 'NRTL';
  model: BinaryModel;
  /** The params argument of the cell functions: RK rows a, b, c, or a parameter card. */
  params: unknown[][];
  /** Excess part of g at T as a jet in x (y = 1 - x carried separately), J/mol. */
  excess: (T: number) => (x: Jet, y: Jet) => Jet;
  /** Ideal part: the spec's entropy term, per family (coefficients of x ln x and y ln y). */
  ideal: { x: number; y: number };
  /** An energy scale of the excess part at T (J/mol): a bound on |g_excess| and its rounding. */
  size: (T: number) => number;
  describe: string;
}

/** The spec's quantities at one temperature. */
interface Spec {
  T: number;
  RT: number;
  /** Energy scale for rounding: RT + size of the excess part, J/mol. */
  E: number;
  /** Scale of q = x y g''/RT (1 plus the excess part's share), for its rounding. */
  Sq: number;
  g(x: number, y: number): number;
  dg(x: number, y: number): number;
  muA(x: number, y: number): number;
  muB(x: number, y: number): number;
  /** q = x y g'' / RT: the sign of g'', well scaled at both ends. */
  q(x: number, y: number): number;
  /** dq/du with u = ln(x/y): x y [(y - x) g'' + x y g'''] / RT. */
  dqdu(x: number, y: number): number;
}

/**
 * The spec's g at T. The ideal part c_x x ln x + c_y y ln y (c = 1 for mole-fraction models, 1/N for
 * Flory–Huggins) has the elementary derivatives (x ln x)' = ln x + 1, (x ln x)'' = 1/x, (x ln x)''' = -1/x^2,
 * written out here so that they stay finite down to x = 1e-300 (a jet of ln x would square 1/x); the
 * excess part, where each model's own algebra lives, is differentiated by the jets.
 */
function specAt(s: RandomSystem, T: number): Spec {
  const RT = R * T;
  const ex = s.excess(T);
  const { x: cx, y: cy } = s.ideal;
  const E = RT + s.size(T);
  const jet = (x: number, y: number) => ex([x, 1, 0, 0], [y, -1, 0, 0]);
  const xlnx = (v: number) => (v > 0 ? v * Math.log(v) : 0);
  const g = (x: number, y: number) => RT * (cx * xlnx(x) + cy * xlnx(y)) + ex(cst(x), cst(y))[0];
  const dg = (x: number, y: number) => RT * (cx * (Math.log(x) + 1) - cy * (Math.log(y) + 1)) + jet(x, y)[1];
  return {
    T, RT, E, Sq: 1 + 10 * (E - RT) / RT,
    g, dg,
    muA: (x, y) => g(x, y) - x * dg(x, y),
    muB: (x, y) => g(x, y) + y * dg(x, y),
    // x y g''/RT: ideal part x y (c_x/x + c_y/y) = c_x y + c_y x
    q: (x, y) => cx * y + cy * x + (x * y * jet(x, y)[2]) / RT,
    // the ideal part of q, c_x y + c_y x, has d/du = x y (c_y - c_x) (dx/du = x y, dy/du = -x y)
    dqdu: (x, y) => {
      const j = jet(x, y);
      return x * y * (cy - cx) + (x * y * ((y - x) * j[2] + x * y * j[3])) / RT;
    },
  };
}

/** Redlich–Kister: g_excess = x y sum_k L_k(T) (1 - 2x)^k, L_k = a + b T + c T ln T (spec, model 1). */
function rkSystem(terms: Array<{ a: number; b: number; c: number }>): RandomSystem {
  const L = (T: number) => terms.map((t) => t.a + t.b * T + t.c * T * Math.log(T));
  return {
    family: 'RK',
    model: redlichKister(terms),
    params: terms.map((t) => [t.a, t.b, t.c]),
    excess: (T) => {
      const Lk = L(T);
      return (x, y) => {
        const d = add(y, times(x, -1));
        let P = cst(Lk[Lk.length - 1]);
        for (let k = Lk.length - 2; k >= 0; k--) P = add(mul(P, d), cst(Lk[k]));
        return mul(mul(x, y), P);
      };
    },
    ideal: { x: 1, y: 1 },
    size: (T) => L(T).reduce((s, l) => s + Math.abs(l), 0),
    describe: `RK ${JSON.stringify(terms)}`,
  };
}

/** Flory–Huggins per mole of sites: g_excess = RT chi phi (1 - phi), chi = A + B/T; ideal (phi/N_B) ln phi + ... */
function fhSystem(p: { NA: number; NB: number; A: number; B: number }): RandomSystem {
  return {
    family: 'FH',
    model: floryHuggins(p),
    params: [['model', 'flory-huggins'], ['NA', p.NA], ['NB', p.NB], ['chi.A', p.A], ['chi.B', p.B]],
    excess: (T) => (x, y) => times(mul(x, y), R * T * (p.A + p.B / T)),
    ideal: { x: 1 / p.NB, y: 1 / p.NA },
    size: (T) => R * T * Math.abs(p.A + p.B / T),
    describe: `FH ${JSON.stringify(p)}`,
  };
}

/**
 * NRTL (spec, model 3; x1 = 1 - x, x2 = x):
 *   g_excess = RT x1 x2 [tau21 G21/(x1 + x2 G21) + tau12 G12/(x2 + x1 G12)],  G_ij = exp(-alpha tau_ij).
 */
function nrtlSystem(p: { a12: number; b12: number; a21: number; b21: number; alpha: number }): RandomSystem {
  const taus = (T: number) => {
    const tau12 = p.a12 + p.b12 / T, tau21 = p.a21 + p.b21 / T;
    return { tau12, tau21, G12: Math.exp(-p.alpha * tau12), G21: Math.exp(-p.alpha * tau21) };
  };
  return {
    family: 'NRTL',
    model: nrtl(p),
    params: [['model', 'nrtl'], ['a12', p.a12], ['b12', p.b12], ['a21', p.a21], ['b21', p.b21], ['alpha', p.alpha]],
    excess: (T) => {
      const { tau12, tau21, G12, G21 } = taus(T);
      return (x2, x1) => {
        const first = times(recip(add(x1, times(x2, G21))), tau21 * G21);
        const second = times(recip(add(x2, times(x1, G12))), tau12 * G12);
        return times(mul(mul(x1, x2), add(first, second)), R * T);
      };
    },
    ideal: { x: 1, y: 1 },
    // G/(x1 + x2 G) <= max(1, G), so |g_excess| <= RT (|tau21| max(1, G21) + |tau12| max(1, G12)) / 4
    size: (T) => {
      const { tau12, tau21, G12, G21 } = taus(T);
      return R * T * (Math.abs(tau21) * Math.max(1, G21) + Math.abs(tau12) * Math.max(1, G12));
    },
    describe: `NRTL ${JSON.stringify(p)}`,
  };
}

// ---------------------------------------------------------------------------------------------
// Random systems (fast-check). Parameters are drawn as values at a temperature T and turned into
// the coefficients of the model, so that every family lands near its interesting region (gaps
// that open and close, dilute boundaries, several gaps) rather than mostly far from it.
// ---------------------------------------------------------------------------------------------

interface Drawn {
  system: RandomSystem;
  /** Temperatures solved in this order (within 10 % of each other: the solves warm-start). */
  Ts: number[];
  /** Uniform numbers in [0, 1] for compositions inside gaps and anywhere. */
  where: number[];
}

/**
 * Uniform in [0, 1]. (fc.double draws evenly over the bit patterns of doubles, so most of its draws
 * in [0, 1] would be tiny numbers: uniform integers give an even spread instead.)
 */
const unit = fc.integer({ min: 0, max: 2 ** 30 }).map((i) => i / 2 ** 30);
const units = (n: number) => fc.array(unit, { minLength: n, maxLength: n });
const lerp = (a: number, b: number, t: number) => a + (b - a) * t;
const temperatures = (T: number, r: number[]) => [T, T * (1 + 0.16 * (r[0] - 0.5)), T * (1 + 0.16 * (r[1] - 0.5))];

/**
 * Redlich–Kister, one to four terms with slopes b in [-20, 20] and c in [-3, 3] J/(mol K), T in
 * [150, 2500] K, and L_k(T)/RT drawn by kind:
 * - dome: L0 in [1.5, 12] RT (around the regular-solution critical value 2 RT), higher terms up to 60 % of L0;
 * - two domes: L0 in [-6, 1] RT, odd terms in [-2, 2] RT, L2 in [8, 30] RT: two gaps or one wide one;
 * - free: every L_k in [-10, 25] RT;
 * - dilute: L0 in [20, 400] RT, other terms in [-2, 2] RT: boundaries from 1e-9 down to about 1e-174.
 */
const rkArb = fc.record({
  T: unit, kind: fc.integer({ min: 0, max: 3 }), n: fc.integer({ min: 1, max: 4 }),
  r: units(4), b: units(4), c: units(4), where: units(4), dT: units(2),
}).map(({ T: t, kind, n, r, b, c, where, dT }): Drawn => {
  const T = Math.exp(lerp(Math.log(150), Math.log(2500), t));
  const reduced = r.slice(0, n).map((v, k) => {
    switch (kind) {
      case 0: return k === 0 ? lerp(1.5, 12, v) : 0; // scaled below
      case 1: return k === 0 ? lerp(-6, 1, v) : k === 2 ? lerp(8, 30, v) : lerp(-2, 2, v);
      case 2: return lerp(-10, 25, v);
      default: return k === 0 ? lerp(20, 400, v) : lerp(-2, 2, v);
    }
  });
  if (kind === 0) for (let k = 1; k < n; k++) reduced[k] = lerp(-0.6, 0.6, r[k]) * reduced[0];
  const terms = reduced.map((l, k) => {
    const bk = lerp(-20, 20, b[k]), ck = lerp(-3, 3, c[k]);
    return { a: l * R * T - bk * T - ck * T * Math.log(T), b: bk, c: ck };
  });
  return { system: rkSystem(terms), Ts: temperatures(T, dT), where };
});

/**
 * Flory–Huggins: N_A, N_B log-uniform in [1, 1e4], T in [200, 600] K, chi(T) from 0.7 to 3 times the
 * critical chi_c = (1/2)(N_A^-1/2 + N_B^-1/2)^2 (spec, closed forms), and B = +-(0.2 to 1.5) chi(T) T K
 * (B > 0: upper critical point; B < 0: chi rises with T, lower critical point), A = chi(T) - B/T.
 */
const fhArb = fc.record({ NA: unit, NB: unit, T: unit, chi: unit, B: unit, sign: fc.boolean(), where: units(4), dT: units(2) })
  .map(({ NA: na, NB: nb, T: t, chi: ch, B: bb, sign, where, dT }): Drawn => {
    const NA = 10 ** (4 * na), NB = 10 ** (4 * nb), T = lerp(200, 600, t);
    const chiC = 0.5 * (1 / Math.sqrt(NA) + 1 / Math.sqrt(NB)) ** 2;
    const chi = chiC * lerp(0.7, 3, ch);
    const B = (sign ? 1 : -1) * lerp(0.2, 1.5, bb) * chi * T;
    return { system: fhSystem({ NA, NB, A: chi - B / T, B }), Ts: temperatures(T, dT), where };
  });

/**
 * NRTL: alpha in [0.1, 0.5], T in [250, 600] K, tau12(T) and tau21(T) in [-2, 6], b_ij in [-3000, 3000] K,
 * a_ij = tau_ij(T) - b_ij/T.
 */
const nrtlArb = fc.record({ alpha: unit, T: unit, tau: units(2), b: units(2), where: units(4), dT: units(2) })
  .map(({ alpha, T: t, tau, b, where, dT }): Drawn => {
    const T = lerp(250, 600, t);
    const b12 = lerp(-3000, 3000, b[0]), b21 = lerp(-3000, 3000, b[1]);
    const p = { a12: lerp(-2, 6, tau[0]) - b12 / T, b12, a21: lerp(-2, 6, tau[1]) - b21 / T, b21, alpha: lerp(0.1, 0.5, alpha) };
    return { system: nrtlSystem(p), Ts: temperatures(T, dT), where };
  });

// ---------------------------------------------------------------------------------------------
// Independent geometry: dense grids and the lower convex hull
// ---------------------------------------------------------------------------------------------

/** Uniform grid over (0, 1) plus log-spaced points towards both ends (down to 1e-300). */
const DENSE: number[] = [];
for (let i = 1; i < 2000; i++) DENSE.push(i / 2000);
const DILUTE: number[] = [];
for (let e = -300; e <= -3.5; e += 0.5) DILUTE.push(10 ** e);

/** Hull grid: HULL_N uniform samples, spacing H. */
const HULL_N = 2001;
const H = 1 / (HULL_N - 1);

/**
 * Edges of the lower convex hull of g sampled on the uniform hull grid (g(0) = g(1) = 0: the pure
 * components are the reference states), by Andrew's monotone chain on points already sorted by x.
 * Also returns the sampled values, for the second differences.
 */
function lowerHull(spec: Spec): { edges: Array<[number, number]>; values: Float64Array } {
  const values = new Float64Array(HULL_N);
  for (let i = 1; i < HULL_N - 1; i++) values[i] = spec.g(i * H, 1 - i * H);
  const chain: number[] = [];
  for (let i = 0; i < HULL_N; i++) {
    while (chain.length >= 2) {
      const o = chain[chain.length - 2], a = chain[chain.length - 1];
      // cross product of (a - o) and (i - o): keep only left (counter-clockwise) turns
      const cross = (a - o) * (values[i] - values[o]) - (values[a] - values[o]) * (i - o);
      if (cross > 0) break;
      chain.pop();
    }
    chain.push(i);
  }
  const edges: Array<[number, number]> = [];
  for (let k = 0; k + 1 < chain.length; k++) edges.push([chain[k], chain[k + 1]]);
  return { edges, values };
}

// ---------------------------------------------------------------------------------------------
// Checks. Each returns a list of problems (empty when the numbers are right).
// ---------------------------------------------------------------------------------------------

/**
 * Twice the largest rounding error of a composition returned as a double (half the spacing of
 * doubles at x is at most x eps / 2 below 1/2 and eps / 4 above).
 */
const representation = (x: number) => (x < 0.5 ? x * EPS : EPS / 2);

/** The phase map at one temperature against the spec. */
function checkMap(spec: Spec, map: PhaseMap): string[] {
  const problems: string[] = [];
  const { gaps, spinodal } = map;
  const at = `T = ${spec.T} K`;

  // gaps ordered from low x, each with x' < x'', disjoint
  gaps.forEach((g, i) => {
    if (!(g.low.x > 0 && g.low.x < g.high.x && g.high.y > 0)) problems.push(`${at}: gap ${i + 1} is not 0 < x' < x'' < 1 (${g.low.x}, ${g.high.x})`);
    if (i > 0 && !(gaps[i - 1].high.x < g.low.x)) problems.push(`${at}: gaps ${i} and ${i + 1} overlap or are out of order`);
  });

  for (const [i, gap] of gaps.entries()) {
    const { low: p1, high: p2 } = gap;
    // Equal chemical potentials (spec: mu_A and mu_B equal in both phases), from the spec's g and
    // its jet derivative at the full-precision (x, y) of each boundary: the issue's bound, 1e-6 J/mol.
    const dA = spec.muA(p1.x, p1.y) - spec.muA(p2.x, p2.y);
    const dB = spec.muB(p1.x, p1.y) - spec.muB(p2.x, p2.y);
    if (!(Math.abs(dA) < 1e-6 && Math.abs(dB) < 1e-6)) {
      problems.push(`${at}: gap ${i + 1} (${p1.x}, ${p2.x}): mu_A differs by ${dA} J/mol, mu_B by ${dB} J/mol`);
    }
    // On the lower convex envelope: the common tangent line(x) = mu_A + m x, m = mu_B - mu_A, lies
    // below g everywhere. Rounding of g and of the line is a few eps of E + |m|; a boundary off by
    // the solver's step tolerance (1e-12 relative in u = ln(x/y), |u| <= 700) tilts the line by at
    // most about 7e-10 RT. 1e-9 (E + |m|) covers both and is still far below the J/mol by which a
    // metastable or misplaced tangent cuts g.
    const muA1 = spec.muA(p1.x, p1.y), m = spec.muB(p1.x, p1.y) - muA1;
    const tol = 1e-9 * (spec.E + Math.abs(m));
    let worst = 0, where = NaN;
    const probe = (x: number, y: number) => {
      const below = spec.g(x, y) - (muA1 + m * x);
      if (below < worst) { worst = below; where = x; }
    };
    for (const x of DENSE) probe(x, 1 - x);
    for (const d of DILUTE) { probe(d, 1 - d); probe(1 - d, d); }
    if (worst < -tol) problems.push(`${at}: the tangent of gap ${i + 1} (${p1.x}, ${p2.x}) cuts g at x = ${where} by ${-worst} J/mol (allowed ${tol})`);
    // Outside the spinodal: g'' >= 0 at both boundaries (q from the jets; rounding of q is a few eps
    // of Sq, the boundary's own error moves q by at most dq/du * 1e-12 |u|: 1e-9 Sq covers both).
    for (const p of [p1, p2]) {
      const q = spec.q(p.x, p.y);
      if (q < -1e-9 * spec.Sq) problems.push(`${at}: boundary x = ${p.x} of gap ${i + 1} lies where g'' < 0 (q = ${q})`);
    }
    for (let s = 0; s + 1 < spinodal.length; s += 2) {
      for (const p of [p1, p2]) {
        if (spinodal[s].x < p.x && p.x < spinodal[s + 1].x) problems.push(`${at}: boundary x = ${p.x} lies inside unstable interval ${s / 2 + 1}`);
      }
    }
  }

  // Spinodal points are roots of g'' (q = 0 to the rounding of q and the root tolerance 1e-14 in u),
  // pairs bound unstable intervals, and each unstable interval lies strictly inside one gap (spec:
  // the envelope cannot touch g where g'' < 0).
  if (spinodal.length % 2 !== 0) problems.push(`${at}: odd number of spinodal points`);
  for (const s of spinodal) {
    const q = spec.q(s.x, s.y);
    if (!(Math.abs(q) <= 1e-9 * spec.Sq)) problems.push(`${at}: spinodal point x = ${s.x} has q = ${q}, not 0`);
  }
  for (let s = 0; s + 1 < spinodal.length; s += 2) {
    const lo = spinodal[s].x, hi = spinodal[s + 1].x;
    const mid = pointBetween(spinodal[s], spinodal[s + 1]);
    if (!(spec.q(mid.x, mid.y) < 0)) problems.push(`${at}: g'' is not negative inside unstable interval ${lo}..${hi}`);
    const holders = gaps.filter((g) => g.low.x < lo && hi < g.high.x).length;
    if (holders !== 1) problems.push(`${at}: unstable interval ${lo}..${hi} lies inside ${holders} gaps`);
  }

  // The lower convex hull of g on the uniform grid (spacing H = 5e-4).
  const { edges, values } = lowerHull(spec);
  // (a) Where the sampled g is locally concave, beyond rounding, g'' < 0 somewhere in those two
  // cells (a negative second difference is h^2 g'' at some point between, by the mean value
  // theorem), so a gap must reach into them. Rounding of a second difference: 4 eps max |g| <= 4 eps E.
  for (let i = 1; i + 1 < HULL_N; i++) {
    const d2 = values[i - 1] - 2 * values[i] + values[i + 1];
    if (d2 < -16 * EPS * spec.E) {
      const a = (i - 1) * H, b = (i + 1) * H;
      if (!gaps.some((g) => g.low.x < b && g.high.x > a)) {
        problems.push(`${at}: g is concave around x = ${i * H} (second difference ${d2} J/mol) but no gap reaches there`);
        break;
      }
    }
  }
  // (b) Gap count against the hull. An edge of the lower hull that skips grid points bounds a
  // gap of the sampled curve. Its ends lie within 2 cells of the true boundaries: each contact
  // vertex is within one cell of the point where g' equals the edge's slope, and that slope differs
  // from the true tangent's by less than one chord's error (the mean value theorem), one more cell.
  // So an edge spanning 20 cells or more must be a returned gap (ends within 2H), and every returned
  // gap wider than 24 cells (20 + 2 x 2 cells) must show as such an edge. Narrower gaps are below
  // what this grid resolves and are not counted either way.
  const long = edges.filter(([i, j]) => j - i >= 20).map(([i, j]) => [i * H, j * H]);
  for (const [a, b] of long) {
    if (!gaps.some((g) => Math.abs(g.low.x - a) <= 2 * H && Math.abs(g.high.x - b) <= 2 * H)) {
      problems.push(`${at}: the hull has a gap ${a}..${b} that is not among the returned gaps [${gaps.map((g) => `${g.low.x}..${g.high.x}`).join(', ')}]`);
    }
  }
  for (const g of gaps.filter((g) => g.high.x - g.low.x > 24 * H)) {
    if (!long.some(([a, b]) => Math.abs(g.low.x - a) <= 2 * H && Math.abs(g.high.x - b) <= 2 * H)) {
      problems.push(`${at}: returned gap ${g.low.x}..${g.high.x} is not in the hull (long edges: ${long.map(([a, b]) => `${a}..${b}`).join(', ')})`);
    }
  }
  return problems;
}

/** A point halfway (in u) between two points. */
function pointBetween(a: { x: number; y: number }, b: { x: number; y: number }) {
  const u = 0.5 * (Math.log(a.x / a.y) + Math.log(b.x / b.y));
  return u < 0 ? { x: Math.exp(u) / (1 + Math.exp(u)), y: 1 / (1 + Math.exp(u)) } : { x: 1 / (1 + Math.exp(-u)), y: Math.exp(-u) / (1 + Math.exp(-u)) };
}

/** Calls a cell function: its number, or the CellFailure it threw (anything else is a problem). */
function callCell<T>(f: () => T): T | CellFailure {
  try {
    return f();
  } catch (e) {
    if (e instanceof CellFailure) return e;
    throw new Error(`a cell function threw something other than a CellFailure: ${String(e)}`);
  }
}

/**
 * The cell functions at one temperature, from the numbers they return (doubles, as a workbook sees
 * them): GAPCOUNT, GAPLOW, GAPHIGH, SPINLOW, SPINHIGH, PHASEFRAC.
 */
function checkCells(s: RandomSystem, spec: Spec, count: number, where: number[], stats: Stats): string[] {
  const problems: string[] = [];
  const at = `T = ${spec.T} K (cells)`;
  const T = spec.T, p = s.params;
  const n = callCell(() => cells.gapCount(T, p));
  if (n !== count) return [`${at}: GAPCOUNT = ${n instanceof CellFailure ? n.message : n}, the core found ${count}`];
  const bounds: Array<[number, number]> = [];
  for (let k = 1; k <= count; k++) {
    const x1 = callCell(() => cells.gapLow(T, p, k)), x2 = callCell(() => cells.gapHigh(T, p, k));
    if (x1 instanceof CellFailure || x2 instanceof CellFailure) {
      problems.push(`${at}: gap ${k} of ${count} gives an error: ${(x1 as CellFailure).message ?? (x2 as CellFailure).message}`);
      continue;
    }
    bounds.push([x1, x2]);
    if (!(x1 > 0 && x1 < x2 && x2 <= 1)) { problems.push(`${at}: GAPLOW/GAPHIGH of gap ${k} = ${x1}, ${x2}`); continue; }
    if (x2 === 1) { stats.roundsToOne++; continue; } // 1 - x'' below 1.1e-16: the double nearest x'' is 1 (core checked above)
    // Equal potentials from the returned doubles. Besides the issue's 1e-6 J/mol, each boundary carries
    // the rounding of a double (half an ulp), which moves mu_A by x g'' and mu_B by y g'' per unit of x:
    // near x = 1 that is RT/y times 1.1e-16, far above 1e-6 J/mol when y is small.
    let slack = 1e-6;
    for (const x of [x1, x2]) {
      // d mu_A/du = -x (x y g''), d mu_B/du = y (x y g'') with x y g'' = RT q; du = dx/(x y)
      const y = 1 - x;
      slack += 2 * spec.RT * Math.abs(spec.q(x, y)) * (x + y) * (representation(x) / x / y);
    }
    const dA = spec.muA(x1, 1 - x1) - spec.muA(x2, 1 - x2), dB = spec.muB(x1, 1 - x1) - spec.muB(x2, 1 - x2);
    if (!(Math.abs(dA) <= slack && Math.abs(dB) <= slack)) problems.push(`${at}: GAPLOW/GAPHIGH of gap ${k} (${x1}, ${x2}): mu differ by ${dA}, ${dB} J/mol (allowed ${slack})`);

    // Lever rule inside the gap (spec): PHASEFRAC high = (x0 - x')/(x'' - x'), low = 1 - high, both in
    // [0, 1]; their sum is 1 to one rounding, and f' x' + f'' x'' = x0 to a few ulps of 1.
    const x0 = x1 + where[k % where.length] * (x2 - x1);
    if (x0 > x1 && x0 < x2) {
      const fHigh = callCell(() => cells.phaseFrac(x0, T, p)), fLow = callCell(() => cells.phaseFrac(x0, T, p, 'low'));
      if (typeof fHigh !== 'number' || typeof fLow !== 'number') problems.push(`${at}: PHASEFRAC(${x0}) inside gap ${k} gives an error`);
      else {
        if (!(fHigh >= 0 && fHigh <= 1 && fLow >= 0 && fLow <= 1)) problems.push(`${at}: PHASEFRAC(${x0}) = ${fLow}, ${fHigh} outside [0, 1]`);
        if (!(Math.abs(fHigh + fLow - 1) <= EPS)) problems.push(`${at}: PHASEFRAC(${x0}) low + high = ${fHigh + fLow}`);
        if (!(Math.abs(fLow * x1 + fHigh * x2 - x0) <= 4 * EPS)) problems.push(`${at}: PHASEFRAC(${x0}) breaks the mass balance by ${fLow * x1 + fHigh * x2 - x0}`);
      }
    }
  }
  // Beyond the last gap: an error that says so, never a number.
  const beyond = callCell(() => cells.gapLow(T, p, count + 1));
  if (!(beyond instanceof CellFailure)) problems.push(`${at}: GAPLOW(gap ${count + 1}) of ${count} gaps gave ${beyond}`);
  else if (beyond.code !== (count === 0 ? '#N/A' : '#NUM!')) problems.push(`${at}: GAPLOW(gap ${count + 1}) gave ${beyond.code} ${beyond.message}`);

  // Spinodal cells: q = 0 at the returned doubles, to the rounding of q plus dq/du times the
  // rounding of the double in u (du = dx / (x y)).
  for (let k = 1; ; k++) {
    const a = callCell(() => cells.spinLow(T, p, k)), b = callCell(() => cells.spinHigh(T, p, k));
    if (a instanceof CellFailure || b instanceof CellFailure) break;
    for (const x of [a, b]) {
      if (x === 1) continue;
      const y = 1 - x, q = spec.q(x, y);
      const tol = 1e-9 * spec.Sq + Math.abs(spec.dqdu(x, y)) * 2 * representation(x) / (x * y);
      if (!(Math.abs(q) <= tol)) problems.push(`${at}: SPINLOW/SPINHIGH ${k} = ${x} has q = ${q}`);
    }
  }

  // PHASEFRAC anywhere: in [0, 1], low + high = 1, and 0 or 1 outside every gap.
  const x0 = Math.min(Math.max(where[0], 1e-9), 1 - 1e-9);
  const fHigh = callCell(() => cells.phaseFrac(x0, T, p)), fLow = callCell(() => cells.phaseFrac(x0, T, p, 'low'));
  if (typeof fHigh !== 'number' || typeof fLow !== 'number') problems.push(`${at}: PHASEFRAC(${x0}) gives an error`);
  else {
    if (!(fHigh >= 0 && fHigh <= 1 && Math.abs(fHigh + fLow - 1) <= EPS)) problems.push(`${at}: PHASEFRAC(${x0}) = ${fLow}, ${fHigh}`);
    const inside = bounds.some(([x1, x2]) => x1 <= x0 && x0 <= x2);
    if (!inside && fHigh !== 0 && fHigh !== 1) problems.push(`${at}: PHASEFRAC(${x0}) outside every gap = ${fHigh}, not 0 or 1`);
  }
  return problems;
}

// ---------------------------------------------------------------------------------------------
// Counts
// ---------------------------------------------------------------------------------------------

interface Stats {
  systems: number;
  temperatures: number;
  errors: Map<string, number>;
  withGaps: number;
  gaps: number;
  severalGaps: number;
  roundsToOne: number;
}
const newStats = (): Stats => ({ systems: 0, temperatures: 0, errors: new Map(), withGaps: 0, gaps: 0, severalGaps: 0, roundsToOne: 0 });
const counts: Record<string, Stats> = {};
const summary: string[] = [];
afterAll(() => {
  for (const [name, s] of Object.entries(counts)) {
    const errors = [...s.errors].map(([r, n]) => `${r} ${n}`).join(', ') || 'none';
    summary.unshift(`${name}: ${s.systems} systems, ${s.temperatures} temperatures solved, ${s.withGaps} with gaps (${s.gaps} gaps, ${s.severalGaps} with two or more), ${s.roundsToOne} x'' that round to 1 as doubles; errors returned: ${errors}`);
  }
  console.info(`random systems (issue 6):\n  ${summary.join('\n  ')}`);
});

/** Solves one system at its temperatures, core (with the solve memory, as the cells use it) and cells. */
function binodalProperty(name: string) {
  const stats = (counts[name] ??= newStats());
  return ({ system: s, Ts, where }: Drawn) => {
    stats.systems++;
    const problems: string[] = [];
    for (const T of Ts) {
      let map: PhaseMap;
      try {
        map = equilibriumAt(s.model, T);
      } catch (e) {
        if (!(e instanceof MixgapError)) throw e;
        stats.errors.set(e.reason, (stats.errors.get(e.reason) ?? 0) + 1);
        // the cells must report it as an error too, never a number
        const n = callCell(() => cells.gapCount(T, s.params));
        if (!(n instanceof CellFailure)) problems.push(`T = ${T}: the core failed (${e.message}) but GAPCOUNT gave ${n}`);
        continue;
      }
      stats.temperatures++;
      if (map.gaps.length > 0) stats.withGaps++;
      if (map.gaps.length > 1) stats.severalGaps++;
      stats.gaps += map.gaps.length;
      const spec = specAt(s, T);
      problems.push(...checkMap(spec, map));
      problems.push(...checkCells(s, spec, map.gaps.length, where, stats));
    }
    if (problems.length > 0) throw new Error(`${s.describe}\n${problems.slice(0, 6).join('\n')}`);
  };
}

/**
 * Draws `numRuns` systems from a named seed (fc.sample: the same systems on every run) and checks
 * them all, so that the counts printed cover every system even when some fail; the failures are
 * listed together at the end (the first 8, each with its system and what was wrong).
 */
function checkAll(arb: fc.Arbitrary<Drawn>, seed: number, numRuns: number, check: (d: Drawn) => void, name: string) {
  const failures: string[] = [];
  fc.sample(arb, { seed, numRuns }).forEach((d, i) => {
    try {
      check(d);
    } catch (e) {
      failures.push(`system ${i} of seed ${seed}: ${e instanceof Error ? e.message : String(e)}`);
    }
  });
  if (failures.length > 0) summary.push(`${name}: ${failures.length} of ${numRuns} systems failed`);
  expect(failures.slice(0, 8).join('\n\n'), `${failures.length} of ${numRuns} systems failed`).toBe('');
}

/**
 * A floor under the errors: the share of temperatures answered with a number, and the reasons an
 * error may have (a solver that gave up on everything would otherwise pass).
 */
function expectAnswered(name: string, minShare: number, allowed: string[] = []): void {
  const s = counts[name];
  const tried = s.temperatures + [...s.errors.values()].reduce((a, b) => a + b, 0);
  const other = [...s.errors].filter(([reason]) => !allowed.includes(reason));
  expect(other, `${name}: errors other than ${allowed.join(', ') || 'none'}`).toEqual([]);
  expect(s.temperatures / tried, `${name}: ${s.temperatures} of ${tried} temperatures answered`).toBeGreaterThanOrEqual(minShare);
}

// Runs per family: thousands of systems in all while the file stays well under a minute.
describe('binodal, spinodal, gap count and lever rule over random systems', () => {
  it('Redlich–Kister, up to 4 terms with temperature slopes (seed 6001)', () => {
    checkAll(rkArb, 6001, 1500, binodalProperty('Redlich–Kister'), 'Redlich–Kister binodal');
    // every drawn system stays within what doubles represent: 99 % answered at least (all today)
    expectAnswered('Redlich–Kister', 0.99);
  }, 120_000);
  it('Flory–Huggins, N from 1 to 1e4, chi = A + B/T (seed 6002)', () => {
    checkAll(fhArb, 6002, 1000, binodalProperty('Flory–Huggins'), 'Flory–Huggins binodal');
    // long chains put a boundary below 1e-300 (a range error, the documented #NUM!): 6.4 % of the
    // temperatures today; a floor of 90 % answered leaves room for the draw, not for a new failure mode
    expectAnswered('Flory–Huggins', 0.9, ['range']);
  }, 120_000);
  it('NRTL, tau_ij = a_ij + b_ij/T, alpha 0.1 to 0.5 (seed 6003)', () => {
    checkAll(nrtlArb, 6003, 1000, binodalProperty('NRTL'), 'NRTL binodal');
    expectAnswered('NRTL', 0.99);
  }, 120_000);
});

// ---------------------------------------------------------------------------------------------
// Critical points and gap temperatures
// ---------------------------------------------------------------------------------------------

interface CritStats {
  systems: number;
  points: number;
  upper: number;
  lower: number;
  closedForm: number;
  closeChecked: number;
  tgapTried: number;
  tgapTurning: number;
  tgapBetweenSamples: number;
  tgapSame: number;
  tgapHigher: number;
  unverifiable: number;
  errors: Map<string, number>;
}
const critCounts: Record<string, CritStats> = {};
afterAll(() => {
  for (const [name, c] of Object.entries(critCounts)) {
    const errors = [...c.errors].map(([r, n]) => `${r} ${n}`).join(', ') || 'none';
    // a TGAP window missed between samples is a known limit of its sampling, not a common case
    expect(c.tgapBetweenSamples, `${name}: TGAP windows between samples`).toBeLessThanOrEqual(Math.ceil(0.01 * c.tgapTried));
    summary.push(`${name}, critical points and TGAP: ${c.systems} systems, ${c.points} critical points (${c.upper} upper, ${c.lower} lower; ${c.closedForm} against a closed form, ${c.closeChecked} checked to close, ${c.unverifiable} beyond what the jets can evaluate), TGAP of ${c.tgapTried} binodal compositions: ${c.tgapSame} gave back their temperature, ${c.tgapHigher} a higher crossing of the same composition (${c.tgapTurning} at a turning point of the boundary, where only the checks below apply; ${c.tgapBetweenSamples} inside a gap only between two of TGAP's sampled temperatures, a lower crossing found); errors returned: ${errors}`);
  }
});

const countError = (m: Map<string, number>, e: CellFailure, fn: string) => m.set(`${fn} ${e.code}`, (m.get(`${fn} ${e.code}`) ?? 0) + 1);

/** Whether x0 lies strictly inside a gap at T (core, fresh solve): undefined if the solve fails. */
function insideAt(s: RandomSystem, T: number, x0: number): boolean | undefined {
  try {
    return phaseMap(s.model.at(T)).gaps.some((g) => g.low.x < x0 && x0 < g.high.x);
  } catch (e) {
    if (e instanceof MixgapError) return undefined;
    throw e;
  }
}

/**
 * Critical points from the spec's closed forms, where a family has one: Flory–Huggins chi(Tc) = chi_c
 * = (1/2)(N_A^-1/2 + N_B^-1/2)^2 at phi_c = sqrt(N_A)/(sqrt(N_A) + sqrt(N_B)); a one-term
 * Redlich–Kister (the regular solution with Omega = L0(T)): L0(Tc) = 2 R Tc at xc = 1/2. Roots
 * between 1 K and 20000 K by the sign changes of f over 20000 samples even in ln T, refined by
 * bisection; undefined when a sample lies within 1e-6 of zero (a near-tangency, or a root at the
 * ends of the window, where counting it is a matter of rounding).
 */
function closedFormPoints(f: (T: number) => number, x: number): Array<{ T: number; x: number }> | undefined {
  const N = 20000, roots: Array<{ T: number; x: number }> = [];
  const Tat = (i: number) => Math.exp((Math.log(20000) * i) / N);
  let prev = f(Tat(0));
  if (Math.abs(prev) < 1e-6) return undefined;
  for (let i = 1; i <= N; i++) {
    const cur = f(Tat(i));
    if (Math.abs(cur) < 1e-6) return undefined;
    if (prev < 0 !== cur < 0) {
      let lo = Tat(i - 1), hi = Tat(i);
      for (let k = 0; k < 200 && hi - lo > 1e-15 * hi; k++) {
        const mid = 0.5 * (lo + hi);
        if (f(mid) < 0 === prev < 0) lo = mid; else hi = mid;
      }
      roots.push({ T: 0.5 * (lo + hi), x });
    }
    prev = cur;
  }
  return roots.sort((a, b) => b.T - a.T);
}

const fhClosed = (d: Drawn) => {
  const card = Object.fromEntries(d.system.params as Array<[string, number]>);
  const { NA, NB } = card;
  const chiC = 0.5 * (1 / Math.sqrt(NA) + 1 / Math.sqrt(NB)) ** 2;
  return closedFormPoints((T) => (card['chi.A'] + card['chi.B'] / T - chiC) / chiC, Math.sqrt(NA) / (Math.sqrt(NA) + Math.sqrt(NB)));
};
const rkClosed = (d: Drawn) => {
  if (d.system.params.length !== 1) return undefined;
  const [a, b, c] = d.system.params[0] as number[];
  return closedFormPoints((T) => (a + b * T + c * T * Math.log(T)) / (R * T) - 2, 0.5);
};

/** u = ln(x/y) -> (x, y) without cancellation. */
const xyOf = (v: number) => {
  const e = Math.exp(-Math.abs(v));
  return v < 0 ? { x: e / (1 + e), y: 1 / (1 + e) } : { x: 1 / (1 + e), y: e / (1 + e) };
};

function criticalProperty(name: string, closedForm: (d: Drawn) => Array<{ T: number; x: number }> | undefined) {
  const c = (critCounts[name] ??= { systems: 0, points: 0, upper: 0, lower: 0, closedForm: 0, closeChecked: 0, tgapTried: 0, tgapTurning: 0, tgapBetweenSamples: 0, tgapSame: 0, tgapHigher: 0, unverifiable: 0, errors: new Map() });
  return (d: Drawn) => {
    const { system: s, Ts, where } = d;
    c.systems++;
    const problems: string[] = [];
    const p = s.params;
    const count = callCell(() => cells.critCount(p));
    if (count instanceof CellFailure) { countError(c.errors, count, 'CRITCOUNT'); return; }
    const points: Array<{ T: number; x: number; kind: string }> = [];
    for (let n = 1; n <= count; n++) {
      const T = callCell(() => cells.tCrit(p, n)), x = callCell(() => cells.xCrit(p, n)), kind = callCell(() => cells.critKind(p, n));
      if (typeof T !== 'number' || typeof x !== 'number' || typeof kind !== 'string') {
        problems.push(`CRITCOUNT = ${count} but critical point ${n} gives an error`);
        continue;
      }
      points.push({ T, x, kind });
    }
    const after = callCell(() => cells.tCrit(p, count + 1));
    if (!(after instanceof CellFailure && after.code === (count === 0 ? '#N/A' : '#NUM!'))) problems.push(`TCRIT(${count + 1}) of ${count} critical points gave ${after instanceof CellFailure ? after.code : after}`);
    c.points += points.length;

    points.forEach((pt, i) => {
      const { T: Tc, x: xc, kind } = pt;
      const at = `critical point ${i + 1} (${kind}, T = ${Tc} K, x = ${xc})`;
      if (kind === 'upper') c.upper++; else c.lower++;
      if (!(Tc >= 1 && Tc <= 20000 && xc > 0 && xc < 1 && (kind === 'upper' || kind === 'lower'))) { problems.push(`${at}: out of range`); return; }
      if (i > 0 && !(points[i - 1].T >= Tc)) problems.push(`${at}: not numbered from the highest temperature`);
      const yc = 1 - xc, u = Math.log(xc / yc);
      // g'' = g''' = 0, scaled: q = x y g''/RT and dq/du = x y [(y - x) g'' + x y g''']/RT vanish.
      // Tc is the root of the depth of a minimum of q, resolved by the core to 1e-13 Tc; q moves by
      // T dq/dT times that. xc is the minimum of q in u: q is stationary there, so an error du in
      // xc moves q by q_uu du^2 / 2 only, and dq/du by q_uu du, with du at most sqrt(4 eps Sq / q_uu)
      // (where rounding of q hides the minimum) or the rounding of the double xc, eps / y. The
      // derivatives in T and u come from central differences of the spec and only set the scale;
      // a factor 10 on the sum covers their own error.
      const spec = specAt(s, Tc);
      const hT = 1e-5, hu = 1e-4;
      const up = specAt(s, Tc * (1 + hT)), down = specAt(s, Tc * (1 - hT));
      const qT = Math.abs(up.q(xc, yc) - down.q(xc, yc)) / (2 * hT);
      const dT = Math.abs(up.dqdu(xc, yc) - down.dqdu(xc, yc)) / (2 * hT);
      const plus = xyOf(u + hu), minus = xyOf(u - hu);
      const quu = Math.abs(spec.dqdu(plus.x, plus.y) - spec.dqdu(minus.x, minus.y)) / (2 * hu);
      const du = Math.max(Math.sqrt((4 * EPS * spec.Sq) / Math.max(quu, 1e-300)), (2 * representation(xc)) / (xc * yc));
      const tolQ = 10 * (1e-13 * qT + 0.5 * quu * du * du + 1e-14 * spec.Sq);
      const tolD = 10 * (1e-13 * dT + quu * du + 1e-14 * spec.Sq);
      const q = spec.q(xc, yc), dq = spec.dqdu(xc, yc);
      if (![q, dq, tolQ, tolD].every(Number.isFinite)) {
        // tau of order 1e2 to 1e3 near 1 K: G_ij = exp(-alpha tau) beyond the range of doubles in
        // the jets' products; this point cannot be checked here (counted, not passed)
        c.unverifiable++;
        return;
      }
      if (!(Math.abs(q) <= tolQ)) problems.push(`${at}: q = x y g''/RT = ${q}, not 0 (allowed ${tolQ})`);
      if (!(Math.abs(dq) <= tolD)) problems.push(`${at}: dq/du = ${dq}, not 0 (allowed ${tolD})`);

      // The gap really closes there: 2e-4 Tc to the side where it exists, q < 0 at xc or next to it
      // (g'' < 0 there, so that composition lies inside a gap whatever the rest of g does) and the
      // cells show a gap around xc; 2e-4 Tc to the other side, q > 0 on a window around xc, and no
      // gap around xc in the cells nor in the lower hull of the sampled g. Skipped where another
      // critical point lies within 6e-4 Tc (the two would interfere at that distance).
      const delta = 2e-4;
      if (points.some((o, j) => j !== i && Math.abs(o.T - Tc) < 3 * delta * Tc)) return;
      c.closeChecked++;
      const Tgap = kind === 'upper' ? Tc * (1 - delta) : Tc * (1 + delta);
      const Tnone = kind === 'upper' ? Tc * (1 + delta) : Tc * (1 - delta);
      const minQ = (sp: Spec) => {
        let min = Infinity;
        for (let k = -20; k <= 20; k++) {
          const { x, y } = xyOf(u + k * 0.0025);
          min = Math.min(min, sp.q(x, y));
        }
        return min;
      };
      const gapSide = specAt(s, Tgap), noneSide = specAt(s, Tnone);
      if (!(minQ(gapSide) < 0)) problems.push(`${at}: no unstable composition next to xc at ${Tgap} K, where the gap should exist`);
      if (!(minQ(noneSide) > 0)) problems.push(`${at}: g'' < 0 next to xc at ${Tnone} K, where the gap should be closed`);
      const around = (T: number) => {
        const n = callCell(() => cells.gapCount(T, p));
        if (n instanceof CellFailure) return n;
        for (let k = 1; k <= n; k++) {
          const a = callCell(() => cells.gapLow(T, p, k)), b = callCell(() => cells.gapHigh(T, p, k));
          if (typeof a === 'number' && typeof b === 'number' && a < xc && xc < b) return true;
        }
        return false;
      };
      const g1 = around(Tgap), g2 = around(Tnone);
      if (g1 !== true) problems.push(`${at}: the cells show no gap around xc at ${Tgap} K (${g1 instanceof CellFailure ? g1.message : g1})`);
      if (g2 !== false) problems.push(`${at}: the cells show a gap around xc at ${Tnone} K (${g2 instanceof CellFailure ? g2.message : g2})`);
      const { edges } = lowerHull(noneSide);
      if (edges.some(([a, b]) => b - a >= 20 && a * H < xc && xc < b * H)) problems.push(`${at}: the hull of g has a gap around xc at ${Tnone} K`);
    });

    // Against the closed forms (spec, "Closed forms") where the family has one: the same number of
    // critical points, each within 1e-9 relative in T (the core resolves Tc to 1e-13, the bisection
    // here to 1e-15; the margin covers the conditioning of the root) and 1e-9 in x.
    const want = closedForm(d);
    if (want) {
      c.closedForm += want.length;
      if (want.length !== points.length) problems.push(`closed form: ${want.length} critical points at ${want.map((w) => w.T).join(', ')} K, the cells give ${points.length} at ${points.map((q) => q.T).join(', ')} K`);
      else want.forEach((w, i) => {
        if (!(Math.abs(points[i].T - w.T) <= 1e-9 * w.T && Math.abs(points[i].x - w.x) <= 1e-9)) problems.push(`closed form: critical point ${i + 1} at (${w.T} K, ${w.x}), the cells give (${points[i].T} K, ${points[i].x})`);
      });
    }

    // TGAP of a binodal composition: x0 = GAPLOW or GAPHIGH of a gap at the system's temperature.
    const T = Ts[0];
    const n = callCell(() => cells.gapCount(T, p));
    if (n instanceof CellFailure) countError(c.errors, n, 'GAPCOUNT');
    const k = typeof n === 'number' ? 1 + Math.min(n - 1, Math.floor(where[1] * n)) : 0;
    const x0 = k > 0 ? callCell(() => (where[2] < 0.5 ? cells.gapLow(T, p, k) : cells.gapHigh(T, p, k))) : undefined;
    if (typeof x0 === 'number' && x0 < 1) {
      c.tgapTried++;
      const Tstar = callCell(() => cells.tGap(x0, p));
      if (Tstar instanceof CellFailure) {
        countError(c.errors, Tstar, 'TGAP');
        // "does not enter a gap" is wrong for a composition that lies on a binodal at T, and "still
        // inside a gap at 20000 K" must be true (or the solve there out of range itself)
        if (Tstar.code === '#N/A') problems.push(`TGAP(${x0}) of a boundary of gap ${k} at ${T} K: ${Tstar.message}`);
        else if (insideAt(s, 20000, x0) === false) problems.push(`TGAP(${x0}) of a boundary of gap ${k} at ${T} K: ${Tstar.code} (${Tstar.message}) but x0 is in no gap at 20000 K`);
      } else {
        const at = `TGAP(${x0}) = ${Tstar} K for a boundary of gap ${k} at ${T} K`;
        // x0 lies on a binodal at T, so the highest such temperature is T or above. How far x0 (the
        // solver's 1e-12 |u| in u plus the rounding of the double) can move that temperature goes
        // through the slope du/dT of the boundary, from the core at T +- 1e-6 T (a scale only).
        const y0 = 1 - x0, u0 = Math.log(x0 / y0);
        let slope = 0, turning = false;
        try {
          const near = [T * (1 - 1e-6), T * (1 + 1e-6)].map((t) => phaseMap(s.model.at(t)).gaps[k - 1]);
          const side = (g: Gap) => (where[2] < 0.5 ? g.low.u : g.high.u);
          if (near[0] && near[1]) slope = Math.abs(side(near[1]) - side(near[0])) / (2e-6 * T);
          // The boundary turns back within 1e-6 T (x0 at the extremum of x(T)): whether x0 enters
          // the gap there at all is decided by the rounding of x0, so its TGAP may be a lower crossing.
          if (near[0] && near[1]) turning = (side(near[0]) - u0) * (side(near[1]) - u0) > 0;
        } catch { /* no scale: only the bisection's 1e-12 T below */ }
        // x0 carries that error, and so does each boundary TGAP's own bisection compares x0 with:
        // twice duX, doubled again for the slope's estimate.
        const duX = 1e-12 * Math.max(1, Math.abs(u0)) + (2 * representation(x0)) / (x0 * y0);
        const tolT = 1e-12 * T + (slope > 0 ? (4 * duX) / slope : 0);
        // TGAP samples 200 temperatures evenly in ln T (5 % apart): a stretch of temperature in which
        // x0 is inside a gap (a boundary that turns back) and that holds none of them can be missed.
        const samples = Array.from({ length: 200 }, (_, i) => Math.pow(20000, i / 199));
        const below = samples.filter((t) => t <= T).pop(), above = samples.find((t) => t > T);
        const between = below !== undefined && above !== undefined && insideAt(s, below, x0) === false && insideAt(s, above, x0) === false;
        if (turning) c.tgapTurning++;
        else if (Tstar < T - tolT && between) c.tgapBetweenSamples++;
        else if (Tstar < T - tolT) problems.push(`${at}: below the temperature at which x0 is on a binodal (allowed ${tolT} K)`);
        // TGAP is where x0 crosses a binodal: inside a gap just below, outside every gap just above
        const eta = 1e-9;
        if (insideAt(s, Tstar * (1 - eta), x0) === false) problems.push(`${at}: x0 is in no gap just below it`);
        if (insideAt(s, Tstar * (1 + eta), x0) === true) problems.push(`${at}: x0 is still inside a gap just above it`);
        if (Math.abs(Tstar - T) <= tolT) c.tgapSame++; else if (Tstar > T) c.tgapHigher++;
        // and it is the highest: x0 inside no gap at any temperature above (24 samples even in ln T up
        // to 20000 K, and just below each upper critical point above TGAP, where a gap is narrowest)
        const probes: number[] = [];
        for (let j = 1; j <= 24; j++) probes.push(Tstar * Math.pow(20000 / Tstar, j / 24));
        for (const q of points) probes.push(q.kind === 'upper' ? q.T * (1 - 1e-7) : q.T * (1 + 1e-7));
        const higher = probes.filter((t) => t > Tstar * (1 + 1e-6) && t <= 20000).find((t) => insideAt(s, t, x0) === true);
        if (higher !== undefined) problems.push(`${at}: x0 is inside a gap at ${higher} K, above it`);
      }
    }
    if (problems.length > 0) throw new Error(`${s.describe}\n${problems.slice(0, 6).join('\n')}`);
  };
}

/**
 * A floor under the errors of the critical-point checks: CRITCOUNT answered for 99 % of the
 * systems at least (all today), GAPCOUNT at the system's temperature for `gapShare` of them. (A
 * TGAP error is checked one by one above: #NUM! only for a composition still inside a gap at 20000 K.)
 */
function expectCritAnswered(name: string, gapShare: number): void {
  const c = critCounts[name];
  const errors = (key: string) => c.errors.get(key) ?? 0;
  const crit = errors('CRITCOUNT #N/A') + errors('CRITCOUNT #NUM!') + errors('CRITCOUNT #VALUE!');
  const gap = errors('GAPCOUNT #N/A') + errors('GAPCOUNT #NUM!') + errors('GAPCOUNT #VALUE!');
  expect(crit / c.systems, `${name}: CRITCOUNT errors in ${crit} of ${c.systems} systems`).toBeLessThanOrEqual(0.01);
  expect(1 - gap / c.systems, `${name}: GAPCOUNT errors in ${gap} of ${c.systems} systems`).toBeGreaterThanOrEqual(gapShare);
}

describe('critical points and gap temperatures over random systems', () => {
  it('Redlich–Kister (seed 6011)', () => {
    checkAll(rkArb, 6011, 300, criticalProperty('Redlich–Kister', rkClosed), 'Redlich–Kister critical points and TGAP');
    expectCritAnswered('Redlich–Kister', 0.99);
  }, 120_000);
  it('Flory–Huggins (seed 6012)', () => {
    checkAll(fhArb, 6012, 300, criticalProperty('Flory–Huggins', fhClosed), 'Flory–Huggins critical points and TGAP');
    // GAPCOUNT out of range (a boundary below 1e-300) for 19 of 300 systems today
    expectCritAnswered('Flory–Huggins', 0.9);
  }, 120_000);
  it('NRTL (seed 6013)', () => {
    checkAll(nrtlArb, 6013, 300, criticalProperty('NRTL', () => undefined), 'NRTL critical points and TGAP');
    expectCritAnswered('NRTL', 0.99);
  }, 120_000);
});
