/**
 * NRTL taus from one measured pair of mutual solubilities (x', x'') at T, for a chosen alpha.
 *
 * Equal activities in both phases (spec: binodal), per RT:
 *   F_A = [mu_A(x') - mu_A(x'')] / RT = 0,   F_B = [mu_B(x') - mu_B(x'')] / RT = 0,
 * two equations in (tau12, tau21), solved by Newton's method with a backtracking line search and
 * a finite-difference Jacobian (central differences, step 1e-6: truncation ~1e-12, rounding ~1e-10,
 * far below what Newton needs). Starts: the taus whose infinite-dilution activity coefficients
 * match those of the two-term Redlich–Kister model through the same tie-line, then a grid of
 * taus from -2 to 8. Several tau pairs can satisfy the equations; only pairs for which the core's
 * binodal solver finds exactly this gap at T are kept, and the one nearest the origin is returned.
 */
import { phaseMap } from '../binodal';
import { R } from '../constants';
import { fail } from '../errors';
import { muA, muB } from '../model';
import { nrtl } from '../models/nrtl';
import { fitTieLines } from './tieLines';

export interface NrtlTaus {
  tau12: number;
  tau21: number;
}

/** Equations met when max |F| is below this (a relative change of activity of 1e-12). */
const F_TOL = 1e-12;
/** The gap the binodal solver finds must reproduce the measured compositions to this (mole fraction). */
const GAP_TOL = 1e-7;

export function fitNrtlSolubilities(T: number, xLow: number, xHigh: number, alpha: number): NrtlTaus {
  if (!(Number.isFinite(T) && T > 0)) fail('range', `T = ${T} must be a temperature above 0 K`);
  if (!(xLow > 0 && xHigh < 1 && xLow < xHigh)) fail('input', `the solubilities must satisfy 0 < x' < x'' < 1 (got x' = ${xLow}, x'' = ${xHigh})`);
  if (!(alpha > 0 && alpha < 1)) fail('range', `alpha = ${alpha}: give a non-randomness between 0 and 1 (typically 0.2 to 0.47)`);
  const y1 = 1 - xLow, y2 = 1 - xHigh;
  const F = (t: NrtlTaus): [number, number] => {
    const iso = nrtl({ a12: t.tau12, b12: 0, a21: t.tau21, b21: 0, alpha }).at(T);
    return [(muA(iso, xLow, y1) - muA(iso, xHigh, y2)) / iso.RT, (muB(iso, xLow, y1) - muB(iso, xHigh, y2)) / iso.RT];
  };

  const starts: NrtlTaus[] = [];
  const dilute = diluteStart(T, xLow, xHigh, alpha);
  if (dilute) starts.push(dilute);
  for (let a = -2; a <= 8; a += 1) for (let b = -2; b <= 8; b += 1) starts.push({ tau12: a, tau21: b });

  const accepted: NrtlTaus[] = [];
  for (const start of starts) {
    const t = newton(F, start);
    if (!t) continue;
    if (accepted.some((s) => Math.abs(s.tau12 - t.tau12) < 1e-8 && Math.abs(s.tau21 - t.tau21) < 1e-8)) continue;
    if (reproduces(t, T, xLow, xHigh, alpha)) accepted.push(t);
    if (accepted.length > 0 && start === dilute) break; // the physical start converged: done
  }
  if (accepted.length === 0) {
    fail('convergence', `no pair of taus with alpha = ${alpha} makes x' = ${xLow} and x'' = ${xHigh} coexist at T = ${T} K: try another alpha (0.2 to 0.47 is usual) or check the solubilities`);
  }
  return accepted.reduce((best, t) => (t.tau12 ** 2 + t.tau21 ** 2 < best.tau12 ** 2 + best.tau21 ** 2 ? t : best));
}

/** Newton on F = 0 from `t0`, or undefined when it does not converge. */
function newton(F: (t: NrtlTaus) => [number, number], t0: NrtlTaus): NrtlTaus | undefined {
  let t = t0;
  let f = F(t);
  const h = 1e-6;
  for (let iter = 0; iter < 60; iter++) {
    const size = Math.max(Math.abs(f[0]), Math.abs(f[1]));
    if (!Number.isFinite(size)) return undefined;
    if (size <= F_TOL) return t;
    const p12 = F({ ...t, tau12: t.tau12 + h }), m12 = F({ ...t, tau12: t.tau12 - h });
    const p21 = F({ ...t, tau21: t.tau21 + h }), m21 = F({ ...t, tau21: t.tau21 - h });
    const J11 = (p12[0] - m12[0]) / (2 * h), J21 = (p12[1] - m12[1]) / (2 * h);
    const J12 = (p21[0] - m21[0]) / (2 * h), J22 = (p21[1] - m21[1]) / (2 * h);
    const det = J11 * J22 - J12 * J21;
    if (!(Math.abs(det) > 0) || !Number.isFinite(det)) return undefined;
    const d12 = -(f[0] * J22 - J12 * f[1]) / det, d21 = -(J11 * f[1] - f[0] * J21) / det;
    // Backtracking: halve the step until |F| decreases (at most 30 halvings).
    let step = 1, moved = false;
    for (let k = 0; k < 30; k++, step /= 2) {
      const next = { tau12: t.tau12 + step * d12, tau21: t.tau21 + step * d21 };
      if (Math.abs(next.tau12) > 50 || Math.abs(next.tau21) > 50) continue;
      const fn = F(next);
      if (Math.max(Math.abs(fn[0]), Math.abs(fn[1])) < size) { t = next; f = fn; moved = true; break; }
    }
    if (!moved) return undefined;
  }
  return undefined;
}

/** Whether the binodal solver finds a gap at T with exactly these boundaries. */
function reproduces(t: NrtlTaus, T: number, xLow: number, xHigh: number, alpha: number): boolean {
  try {
    const { gaps } = phaseMap(nrtl({ a12: t.tau12, b12: 0, a21: t.tau21, b21: 0, alpha }).at(T));
    return gaps.some((g) => Math.abs(g.low.x - xLow) <= GAP_TOL && Math.abs(g.high.x - xHigh) <= GAP_TOL);
  } catch {
    return false;
  }
}

/**
 * The taus whose infinite-dilution activity coefficients match those of the two-term
 * Redlich–Kister model through the same tie-line: ln gamma_B(x -> 0) = (L0 + L1)/RT and
 * ln gamma_A(x -> 1) = (L0 - L1)/RT; for NRTL ln gamma_B = tau12 + tau21 G21 and
 * ln gamma_A = tau21 + tau12 G12 (fixed-point iteration, which converges for moderate taus).
 */
function diluteStart(T: number, xLow: number, xHigh: number, alpha: number): NrtlTaus | undefined {
  try {
    const fit = fitTieLines([{ T, xLow, xHigh }], [false, false]);
    const RT = R * T;
    const gB = (fit.terms[0].a + fit.terms[1].a) / RT, gA = (fit.terms[0].a - fit.terms[1].a) / RT;
    let tau12 = gB / 2, tau21 = gA / 2;
    for (let i = 0; i < 200; i++) {
      const next12 = gB - tau21 * Math.exp(-alpha * tau21);
      const next21 = gA - tau12 * Math.exp(-alpha * tau12);
      if (!Number.isFinite(next12) || !Number.isFinite(next21)) return undefined;
      if (Math.abs(next12 - tau12) + Math.abs(next21 - tau21) < 1e-12) return { tau12: next12, tau21: next21 };
      tau12 = 0.5 * (tau12 + next12);
      tau21 = 0.5 * (tau21 + next21);
    }
    return { tau12, tau21 };
  } catch {
    return undefined;
  }
}
