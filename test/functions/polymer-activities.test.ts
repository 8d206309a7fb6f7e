/**
 * Issue "polymer activities per molecule": ACTIVITY, ACTCOEF and CHEMPOT of a Flory–Huggins card
 * are per mole of molecules (N_i lattice sites each), GMIX, GEXCESS, DRIVEFORCE and DECOMPGAIN per
 * mole of sites; an activity below the smallest normal double is an error that points to CHEMPOT,
 * which keeps the logarithm.
 */
import { describe, expect, it } from 'vitest';
import { CellFailure } from '../../src/functions/errors';
import { actCoef, activity, chemPot, gMix } from '../../src/functions/functions';
import { fhG, R_SPEC } from '../core/support/spec';

const card = (NB: number, chiA: number, extra: unknown[][] = []) =>
  [['model', 'flory-huggins'], ['NA', 1], ['NB', NB], ['chi.A', chiA], ['chi.B', 0], ...extra];

/** Flory, Principles of Polymer Chemistry (1953), ch. XII (from memory: chapter number), per molecule. */
const lnSolvent = (N: number, chi: number, v2: number) => Math.log1p(-v2) + (1 - 1 / N) * v2 + chi * v2 * v2;
const lnPolymer = (N: number, chi: number, v2: number) => Math.log(v2) - (N - 1) * (1 - v2) + chi * N * (1 - v2) ** 2;

describe('a 1000-mer in a solvent, phi = 0.1, chi = 0.55 (Flory 1953, ch. XII: ln a_2 = -455.90)', () => {
  const T = 300, N = 1000, chi = 0.55, phi = 0.1;
  const want = lnPolymer(N, chi, phi);

  it('ACTIVITY of the polymer is exp(-455.90), not the per-site 0.634', () => {
    // ln a is formed from terms of size 1000 and rounds at a few 1e-13; exp turns that into a
    // relative error of the same size: 1e-11 relative is ample.
    const a = activity(phi, T, card(N, chi));
    expect(Math.abs(a / Math.exp(want) - 1)).toBeLessThan(1e-11);
    expect(Math.log(a)).toBeCloseTo(-455.9026, 4); // the hand arithmetic: ln 0.1 - 999 (0.9) + 0.55 (1000)(0.81)
  });

  it('ACTCOEF = a/phi and CHEMPOT = RT ln a (J per mole of chains)', () => {
    // same rounding as above, 1e-11 relative
    expect(Math.abs(actCoef(phi, T, card(N, chi)) / (Math.exp(want) / phi) - 1)).toBeLessThan(1e-11);
    expect(Math.abs(chemPot(phi, T, card(N, chi)) / (R_SPEC * T * want) - 1)).toBeLessThan(1e-12);
  });

  it('the solvent (A) per molecule, and CHEMPOT in a kJ/mol card', () => {
    // terms of size 1: 1e-13 relative is far above rounding
    const lnA = lnSolvent(N, chi, phi);
    expect(Math.abs(activity(phi, T, card(N, chi), 'A') / Math.exp(lnA) - 1)).toBeLessThan(1e-13);
    const kJ = chemPot(phi, T, card(N, chi, [['energy', 'kJ/mol']]));
    expect(Math.abs(kJ / ((R_SPEC * T * want) / 1000) - 1)).toBeLessThan(1e-12);
  });

  it('GMIX stays per mole of lattice sites (spec, model 2)', () => {
    // the spec's g written independently (test/core/support/spec.ts): rounding only, 1e-12 relative
    const g = fhG({ NA: 1, NB: N, A: chi, B: 0 }, T, phi, 1 - phi);
    expect(Math.abs(gMix(phi, T, card(N, chi)) / g - 1)).toBeLessThan(1e-12);
  });
});

describe('an activity below 2.2e-308: #NUM! pointing to CHEMPOT, which still gives RT ln a', () => {
  // A 10000-mer at phi = 0.1, chi = 0.55: ln a_2 = ln 0.1 - 9999 (0.9) + 5500 (0.81) = -4546.4
  // (Flory 1953, ch. XII, as above): a = 10^-1974, far below any double.
  const T = 300, N = 10000, chi = 0.55, phi = 0.1;
  const failure = (f: () => unknown) => {
    try {
      return `returned ${String(f())}`;
    } catch (e) {
      return e instanceof CellFailure ? e : `threw ${String(e)}`;
    }
  };

  it('ACTIVITY and ACTCOEF', () => {
    for (const f of [() => activity(phi, T, card(N, chi)), () => actCoef(phi, T, card(N, chi))]) {
      const got = failure(f);
      if (!(got instanceof CellFailure)) expect.fail(got);
      expect(got.code).toBe('#NUM!');
      expect(got.message).toMatch(/exp\(-454[0-9.]+\), below 2\.2e-308/);
      expect(got.message).toMatch(/CHEMPOT/);
    }
  });

  it('CHEMPOT gives the logarithm to full precision', () => {
    // terms of size 1e4: rounding a few 1e-12 absolute in ln a, 1e-12 relative is ample
    expect(Math.abs(chemPot(phi, T, card(N, chi)) / (R_SPEC * T * lnPolymer(N, chi, phi)) - 1)).toBeLessThan(1e-12);
  });
});
