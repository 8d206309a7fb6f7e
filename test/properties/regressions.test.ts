/**
 * Regression tests for the bugs the random-system properties (./random-systems.test.ts) found. Each
 * names the bug; the systems are the shrunk counterexamples fast-check reported. The expected values
 * come from the spec (../../../shared/spec/thermodynamics.md): its closed forms and its definition of
 * the binodal (equal chemical potentials, evaluated here from the spec's g, not from the core).
 */
import { describe, expect, it } from 'vitest';
import { phaseMap } from '../../src/core/binodal';
import { MixgapError } from '../../src/core/errors';
import { forgetSolves } from '../../src/core/equilibrium';
import { floryHuggins } from '../../src/core/models/floryHuggins';
import { redlichKister } from '../../src/core/models/redlichKister';
import { CellFailure } from '../../src/functions/errors';
import * as cells from '../../src/functions/functions';
import { R_SPEC, rkDg, rkG, type RkTerm } from '../core/support/spec';

interface Fh { NA: number; NB: number; A: number; B: number }
const card = (p: Fh) => [['model', 'flory-huggins'], ['NA', p.NA], ['NB', p.NB], ['chi.A', p.A], ['chi.B', p.B]];

/**
 * Flory–Huggins chemical potentials from the spec's g (per mole of sites):
 *   g  = RT[(phi/N_B) ln phi + ((1-phi)/N_A) ln(1-phi) + chi phi (1-phi)]
 *   g' = RT[(ln phi + 1)/N_B - (ln(1-phi) + 1)/N_A + chi (1 - 2 phi)]
 * mu_A = g - phi g', mu_B = g + (1 - phi) g'.
 */
function fhMu(p: Fh, T: number, x: number) {
  const y = 1 - x, RT = R_SPEC * T, chi = p.A + p.B / T;
  const xlnx = (v: number) => (v > 0 ? v * Math.log(v) : 0);
  const g = RT * (xlnx(x) / p.NB + xlnx(y) / p.NA + chi * x * y);
  const dg = RT * ((Math.log(x) + 1) / p.NB - (Math.log(y) + 1) / p.NA + chi * (y - x));
  return { A: g - x * dg, B: g + y * dg };
}

/** The error code a cell function throws, or 'no error: <value>'. */
function codeOf(f: () => unknown): string {
  try {
    return `no error: ${String(f())}`;
  } catch (e) {
    return e instanceof CellFailure ? e.code : `not a CellFailure: ${String(e)}`;
  }
}

// The bound on a returned binodal: equal chemical potentials to 1e-6 J/mol. At the
// compositions below (both above 1e-300 and below 0.9) the rounding of the double that a cell
// returns moves mu by less than RT * 1e-15 = 2e-12 J/mol, far inside it.
const MU = 1e-6;

describe('regressions found by the random-system properties', () => {
  // seed 6002 (Flory–Huggins binodal property), shrunk
  const warm: Fh = { NA: 1, NB: 1275.5247130587807, A: -0.22819599490420206, B: 351.8990092203269 };

  it('regression: a warm-started solve returns a boundary below 1e-300 (x\' = 7.9e-309) instead of an error, and hands it on to the next temperature', () => {
    forgetSolves();
    const p = card(warm);
    // 221.17 K: a boundary near 5.6e-275, solved from scratch (the first call for this system)
    const x1 = cells.gapLow(221.16644456982613, p), x2 = cells.gapHigh(221.16644456982613, p);
    const a = fhMu(warm, 221.16644456982613, x1), b = fhMu(warm, 221.16644456982613, x2);
    expect(Math.abs(a.B - b.B)).toBeLessThan(MU);
    // 211.47 K, started from 221.17 K: the A-rich boundary lies below 1e-300 (a solve from scratch
    // reports exactly that); it cannot be given as a double with its precision, so: an error
    expect(codeOf(() => cells.gapLow(211.47244718069652, p))).toBe('#NUM!');
    // 217.45 K, started from the answer at 211.47 K: the boundary is near 1.6e-287 and representable
    const y1 = cells.gapLow(217.45062174315754, p), y2 = cells.gapHigh(217.45062174315754, p);
    const c = fhMu(warm, 217.45062174315754, y1), d = fhMu(warm, 217.45062174315754, y2);
    expect(Math.abs(c.A - d.A), 'mu_A difference, J/mol').toBeLessThan(MU);
    expect(Math.abs(c.B - d.B), `mu_B difference, J/mol (GAPLOW = ${y1})`).toBeLessThan(MU);
  });

  it('regression: the same warm start inside the core (phaseMap with a hint) gives x\' below 1e-300 rather than a range error', () => {
    const model = floryHuggins(warm);
    const hint = phaseMap(model.at(221.16644456982613));
    let reason = 'no error';
    try {
      const map = phaseMap(model.at(211.47244718069652), hint);
      reason = `no error: x' = ${map.gaps[0]?.low.x}`;
    } catch (e) {
      reason = e instanceof MixgapError ? e.reason : String(e);
    }
    expect(reason).toBe('range');
  });

  it('regression: TGAP of a boundary near 3e-300 comes back 11.8 K too high (528.77 K instead of 517.01 K): its search warm-starts through boundaries below 1e-300', () => {
    // seed 6012 (critical points and TGAP property)
    const p: Fh = { NA: 3.7880764515156446, NB: 9999.999742666067, A: 0.12237932746707297, B: 81.87281753236782 };
    const T = 517.0139614492655;
    forgetSolves();
    const x0 = cells.gapLow(T, card(p)), x2 = cells.gapHigh(T, card(p));
    // x0 is on the binodal at T (equal potentials, spec) ...
    const a = fhMu(p, T, x0), b = fhMu(p, T, x2);
    expect(Math.abs(a.A - b.A)).toBeLessThan(MU);
    expect(Math.abs(a.B - b.B)).toBeLessThan(MU);
    // ... and this boundary rises with T up to the upper critical point (chi = A + B/T falls with
    // T; Tc = B/(chi_c - A) = 5531 K by the spec's closed form), so x0 enters the gap on cooling at
    // T and at no higher temperature: TGAP(x0) = T. The boundary moves by du/dT ~ 2 per K here, so
    // the 1e-12 relative error of x0 in u is 5e-13 K; 1e-9 T allows for the bisection (1e-13 T).
    expect(Math.abs(cells.tGap(x0, card(p)) - T)).toBeLessThan(1e-9 * T);
  });

  it('regression: a spurious "closer than 1e-300" range error at 529 K, where the A-rich boundary is near 4e-289 (a trial slope of the tangent search reaches past 1e-300)', () => {
    const p: Fh = { NA: 3.7880764515156446, NB: 9999.999742666067, A: 0.12237932746707297, B: 81.87281753236782 };
    forgetSolves();
    let x1 = NaN, x2 = NaN;
    const code = codeOf(() => { x1 = cells.gapLow(529, card(p)); x2 = cells.gapHigh(529, card(p)); });
    expect(code.startsWith('no error'), code).toBe(true);
    const a = fhMu(p, 529, x1), b = fhMu(p, 529, x2);
    expect(Math.abs(a.A - b.A)).toBeLessThan(MU);
    expect(Math.abs(a.B - b.B)).toBeLessThan(MU);
  });

  it('regression: the slope solve stops on a bisection step 1e-12 |u| wide: mu_A of the gap differs by 1.4e-6 J/mol (boundary 1e-72 from x = 1)', () => {
    // seed 6001 (Redlich–Kister binodal property), shrunk. With u'' = 165, the Newton step lands on
    // the root to within an ulp, falls back to bisection as "outside the bracket", and the bisection
    // stops when its step is 1e-12 |u| = 1.7e-10: d mu_A/du = -x (x y g'') ~ -RT there, 1.4e-6 J/mol.
    const terms: RkTerm[] = [{ a: 1606169.7410195374, b: -20, c: -3 }, { a: 29194.04627690197, b: -20, c: -3 }];
    const T = 1147.7521659680983;
    const [gap] = phaseMap(redlichKister(terms).at(T)).gaps;
    const mu = (p: { x: number; y: number }) => {
      const g = rkG(terms, T, p.x, p.y), dg = rkDg(terms, T, p.x, p.y);
      return { A: g - p.x * dg, B: g + p.y * dg };
    };
    const a = mu(gap.low), b = mu(gap.high);
    // mu is of order 1.5e6 J/mol here: rounding of the spec's formulas is about 1e-9 J/mol
    expect(Math.abs(a.A - b.A), 'mu_A difference, J/mol').toBeLessThan(MU);
    expect(Math.abs(a.B - b.B), 'mu_B difference, J/mol').toBeLessThan(MU);
  });

  it('regression: CRITCOUNT misses the critical point of an asymmetric Flory–Huggins blend (N_A = 4387, N_B = 1): the followed minimum of q jumps more than 1 in u between temperature samples', () => {
    // seed 6012 (critical points and TGAP property); 19 of the 200 Flory–Huggins systems there.
    const p: Fh = { NA: 4387.277883281091, NB: 1.00000010293358, A: -0.27955900178041826, B: 346.53572915130917 };
    // Spec, closed forms: chi_c = (1/2)(N_A^-1/2 + N_B^-1/2)^2, phi_c = sqrt(N_A)/(sqrt(N_A) + sqrt(N_B));
    // with chi = A + B/T, Tc = B/(chi_c - A) = 436.02 K. B > 0: chi falls with T, the gap lies below Tc.
    const chiC = 0.5 * (1 / Math.sqrt(p.NA) + 1 / Math.sqrt(p.NB)) ** 2;
    const Tc = p.B / (chiC - p.A), phiC = Math.sqrt(p.NA) / (Math.sqrt(p.NA) + Math.sqrt(p.NB));
    forgetSolves();
    expect(cells.critCount(card(p))).toBe(1);
    // the core resolves Tc to 1e-13; 1e-9 covers the conditioning (as in test/core/critical.test.ts)
    expect(Math.abs(cells.tCrit(card(p)) - Tc)).toBeLessThan(1e-9 * Tc);
    expect(Math.abs(cells.xCrit(card(p)) - phiC)).toBeLessThan(1e-9);
    expect(cells.critKind(card(p))).toBe('upper');
  });

  it('regression: 6.3e-9 K below the critical temperature GAPCOUNT is 0 and GAPLOW says "no gap" while SPINLOW finds an unstable interval', () => {
    // found by the worst-case bench (temperatures within 1e-12 of a critical point)
    // Porter, Easterling & Sherif (2009) ch. 1: regular solution, Tc = Omega/2R, a gap at every T < Tc
    // containing x = 1/2; spec: every unstable interval lies inside a gap.
    const omega = 21000, Tc = omega / (2 * R_SPEC), T = Tc * (1 - 5e-12);
    forgetSolves();
    const s = cells.spinLow(T, omega as any);
    expect(s).toBeLessThan(0.5);
    expect(cells.gapCount(T, omega as any)).toBe(1);
    const x1 = cells.gapLow(T, omega as any), x2 = cells.gapHigh(T, omega as any);
    expect(x1).toBeLessThan(s);
    expect(x2).toBeGreaterThan(0.5);
  });
});
