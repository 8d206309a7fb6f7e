/**
 * Tie-line fit: synthetic tie-lines made by the core's binodal solver from known coefficients must
 * give those coefficients back; the fit must refuse data that cannot determine them; its standard
 * errors must describe the scatter of noisy data.
 */
import { describe, expect, it } from 'vitest';
import { phaseMap } from '../../../src/core/binodal';
import { MixgapError } from '../../../src/core/errors';
import { fitTieLines, type TieLine } from '../../../src/core/fit/tieLines';
import { redlichKister, type RedlichKisterTerm } from '../../../src/core/models/redlichKister';

/** Tie-lines of gap 1 of a model at the given temperatures, from the core's common-tangent solver. */
function tieLinesOf(terms: RedlichKisterTerm[], Ts: number[]): TieLine[] {
  const model = redlichKister(terms);
  return Ts.map((T) => {
    const gap = phaseMap(model.at(T)).gaps[0];
    return { T, xLow: gap.low.x, xHigh: gap.high.x };
  });
}

function reason(f: () => unknown): string {
  try { f(); } catch (e) { return e instanceof MixgapError ? `${e.reason}: ${e.message}` : `other: ${String(e)}`; }
  return 'no error';
}

describe('round trip: coefficients -> tie-lines (binodal solver) -> coefficients', () => {
  // The tie-lines satisfy the equal-potential equations to the solver's precision (~1e-15 in
  // ln activity), so the least squares reproduce the coefficients to rounding amplified by the
  // condition number (below 1e3 here): 1e-9 relative leaves a margin of 1e3 or more.
  const cases: Array<{ name: string; terms: RedlichKisterTerm[]; slopes: boolean[]; Ts: number[] }> = [
    { name: 'regular solution', terms: [{ a: 20000, b: 0, c: 0 }], slopes: [false], Ts: [600, 900, 1100] },
    { name: 'two terms with slopes', terms: [{ a: 22000, b: -4, c: 0 }, { a: 3000, b: 1.5, c: 0 }], slopes: [true, true], Ts: [700, 800, 900, 1000, 1100] },
    {
      name: 'three terms, slope on L0 only, dilute A-rich side (x\' ~ 1e-4)',
      terms: [{ a: 30000, b: -2, c: 0 }, { a: -9000, b: 0, c: 0 }, { a: 2500, b: 0, c: 0 }],
      slopes: [true, false, false],
      Ts: [500, 650, 800, 950],
    },
    { name: 'one tie-line, two constant terms (exactly determined)', terms: [{ a: 18000, b: 0, c: 0 }, { a: -4000, b: 0, c: 0 }], slopes: [false, false], Ts: [700] },
  ];
  for (const { name, terms, slopes, Ts } of cases) {
    it(name, () => {
      const data = tieLinesOf(terms, Ts);
      const fit = fitTieLines(data, slopes);
      fit.terms.forEach((t, k) => {
        const scale = Math.abs(terms[k].a) + 1000 * Math.abs(terms[k].b);
        expect(Math.abs(t.a - terms[k].a), `a of L${k}`).toBeLessThan(1e-9 * scale);
        expect(Math.abs(t.b - terms[k].b), `b of L${k}`).toBeLessThan(1e-12 * scale);
        expect(t.c).toBe(0);
      });
      expect(fit.dof).toBe(2 * Ts.length - slopes.length - slopes.filter(Boolean).length);
      if (fit.dof === 0) expect(fit.errors).toBeUndefined();
      else expect(fit.rms).toBeLessThan(1e-12); // exact data: nothing left but rounding
    });
  }

  it('the refitted model puts the gap back where the tie-lines were', () => {
    const terms = [{ a: 30000, b: -2, c: 0 }, { a: -9000, b: 0, c: 0 }, { a: 2500, b: 0, c: 0 }];
    const data = tieLinesOf(terms, [500, 650, 800, 950]);
    const model = redlichKister(fitTieLines(data, [true, false, false]).terms);
    for (const t of data) {
      const gap = phaseMap(model.at(t.T)).gaps[0];
      // relative to x (the dilute boundary is ~1e-4): the solver's 1e-15 in ln x, amplified by the fit's rounding
      expect(Math.abs(gap.low.x - t.xLow) / t.xLow).toBeLessThan(1e-8);
      expect(Math.abs(gap.high.x - t.xHigh)).toBeLessThan(1e-8);
    }
  });
});

describe('noisy tie-lines: the standard errors describe the scatter', () => {
  // Deterministic noise (a fixed linear congruential sequence, seed 12345) of standard deviation
  // sigma = 0.002 added to each composition of 40 tie-lines. The fit's rms composition residual
  // estimates sigma; with 80 - 4 degrees of freedom its sampling error is ~8 %, so a factor 1.5
  // either way cannot be missed by chance, while a wrong weighting (residuals in ln activity, or
  // unscaled) would be off by factors of 5 or more. The true coefficients must lie within 4
  // standard errors of the fitted ones (a 6e-5 chance per coefficient for a correct estimate).
  const truth = [{ a: 22000, b: -4, c: 0 }, { a: 3000, b: 1.5, c: 0 }];
  let seed = 12345;
  const uniform = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
  const gauss = () => Math.sqrt(-2 * Math.log(1 - uniform())) * Math.cos(2 * Math.PI * uniform());
  const sigma = 0.002;
  const Ts = Array.from({ length: 40 }, (_, i) => 650 + 10 * i);
  const data = tieLinesOf(truth, Ts).map((t) => ({ T: t.T, xLow: t.xLow + sigma * gauss(), xHigh: t.xHigh + sigma * gauss() }));

  it('rms residual ~ sigma, coefficients within 4 standard errors', () => {
    const fit = fitTieLines(data, [true, true]);
    expect(fit.rms).toBeGreaterThan(sigma / 1.5);
    expect(fit.rms).toBeLessThan(sigma * 1.5);
    fit.terms.forEach((t, k) => {
      expect(Math.abs(t.a - truth[k].a)).toBeLessThan(4 * fit.errors![k].a);
      expect(Math.abs(t.b - truth[k].b)).toBeLessThan(4 * fit.errors![k].b!);
    });
  });
});

describe('data that cannot determine the coefficients are refused', () => {
  const data = tieLinesOf([{ a: 22000, b: -4, c: 0 }, { a: 3000, b: 1.5, c: 0 }], [700, 800]);

  it('more coefficients than equations', () => {
    expect(reason(() => fitTieLines(data.slice(0, 1), [true, true]))).toMatch(/^input: 1 tie-line gives 2 equations for 4 coefficients: the fit is under-determined/);
    expect(reason(() => fitTieLines(data, [true, true, true]))).toMatch(/^input: .*4 equations for 6 coefficients/);
  });

  it('temperature slopes with every tie-line at one temperature', () => {
    const same = [{ T: 800, xLow: 0.1, xHigh: 0.8 }, { T: 800, xLow: 0.1, xHigh: 0.8 }];
    expect(reason(() => fitTieLines(same, [true]))).toMatch(/^input: temperature slopes need tie-lines at two or more temperatures/);
  });

  it('three terms from three nearly identical tie-lines are ill-conditioned', () => {
    // Tie-lines 1e-6 K apart are the same two equations three times (to ~1e-9): six equations of
    // rank two cannot fix three coefficients; the condition number is ~1e9 or infinite (> 1e6 allowed).
    const near = tieLinesOf([{ a: 22000, b: 0, c: 0 }], [700, 700.000001, 700.000002]);
    expect(reason(() => fitTieLines(near, [false, false, false]))).toMatch(/^input: the fit is ill-conditioned \(condition number (infinite|\d)/);
  });

  it('compositions out of order or out of range', () => {
    expect(reason(() => fitTieLines([{ T: 800, xLow: 0.8, xHigh: 0.1 }], [false]))).toMatch(/^input: tie-line 1: x' = 0.8 must be below x'' = 0.1/);
    expect(reason(() => fitTieLines([{ T: 800, xLow: 0, xHigh: 0.5 }], [false]))).toMatch(/^range: tie-line 1: compositions must lie strictly between 0 and 1/);
    expect(reason(() => fitTieLines([{ T: -5, xLow: 0.1, xHigh: 0.5 }], [false]))).toMatch(/^range: tie-line 1: T = -5/);
  });
});
